import { useRef } from "react";
import { data, Form, Link, useFetcher, useNavigation, useSubmit } from "react-router";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { requireRole } from "~/.server/auth";
import { pageFailure } from "~/.server/replies";
import {
  duplicateShelfSession,
  importShelfSessions,
  listShelfSessions,
  listShelfTags,
  removeShelfSession,
  setArchived,
} from "~/.server/services/shelf";
import { SPORTS, SPORT_LABEL } from "~/lib/sessions";
import { shelfFilter, shelfSearch } from "~/lib/shelf-filter";
import { ImportForm } from "~/components/shelf/shelf-import-form";
import { SessionCard } from "~/components/shelf/shelf-session-card";
import type { Route } from "./+types/sessions";

export const meta: Route.MetaFunction = () => [{ title: "Session shelf · Pacewright" }];

// The filters are search params: a filtered shelf survives a reload and can be bookmarked, and after a change
// (import, duplicate, archive) the router's revalidation reads the same filtered list again.
export async function loader({ request }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  const filter = shelfFilter(new URL(request.url).searchParams);
  const [sessions, tags] = await Promise.all([listShelfSessions(coach.id, filter), listShelfTags(coach.id)]);
  return { filter, sessions, tags };
}

const MAX_IMPORT_BYTES = 1024 * 1024;

export async function action({ request }: Route.ActionArgs) {
  const coach = await requireRole(request, "coach");
  const form = await request.formData();
  const intent = form.get("intent");
  const id = Number(form.get("sessionId"));
  if (intent === "import") {
    const file = form.get("file");
    if (!(file instanceof File) || file.size === 0)
      return data(
        { ok: false as const, message: "Choose a session file to import.", details: [] as string[] },
        { status: 400 },
      );
    if (file.size > MAX_IMPORT_BYTES)
      return data(
        { ok: false as const, message: "That file is larger than 1 MB.", details: [] as string[] },
        { status: 413 },
      );
    try {
      const n = await importShelfSessions(coach.id, await file.text());
      return { ok: true as const, message: `Imported ${n} session${n === 1 ? "" : "s"}.`, details: [] as string[] };
    } catch (err) {
      return pageFailure(err, (e) => ({ ok: false as const, message: e.message, details: e.details ?? [] }));
    }
  }
  if (intent === "duplicate") {
    const copy = await duplicateShelfSession(coach.id, id);
    if (!copy)
      return data(
        { ok: false as const, message: "That session is not on your shelf.", details: [] as string[] },
        { status: 404 },
      );
    return { ok: true as const, message: `Made “${copy.name}”.`, details: [] as string[] };
  }
  if (intent === "remove") {
    const result = await removeShelfSession(coach.id, id);
    if (!result)
      return data(
        { ok: false as const, message: "That session is not on your shelf.", details: [] as string[] },
        { status: 404 },
      );
    return {
      ok: true as const,
      message:
        result === "archived"
          ? "This session is used in a plan, so it was archived instead of deleted."
          : "Session deleted.",
      details: [] as string[],
    };
  }
  if (intent === "unarchive" || intent === "archive") {
    if (!(await setArchived(coach.id, id, intent === "archive")))
      return data(
        { ok: false as const, message: "That session is not on your shelf.", details: [] as string[] },
        { status: 404 },
      );
    return {
      ok: true as const,
      message: intent === "archive" ? "Session archived." : "Session back on the shelf.",
      details: [] as string[],
    };
  }
  return data({ ok: false as const, message: "Unknown request.", details: [] as string[] }, { status: 400 });
}

export default function Shelf({ loaderData }: Route.ComponentProps) {
  const { filter, sessions, tags } = loaderData;
  const act = useFetcher<typeof action>();
  const submit = useSubmit();
  const navigation = useNavigation();
  const loading = navigation.state === "loading" && navigation.location.pathname === "/coach/sessions";
  const typing = useRef<ReturnType<typeof setTimeout>>(undefined);
  // Each change applies at once, replacing the history entry; typing in the search box waits for a short pause so
  // a word is one request, not one per key. Without JavaScript the button sends the form.
  const apply = (form: HTMLFormElement, pause: number) => {
    clearTimeout(typing.current);
    typing.current = setTimeout(
      () => submit(shelfSearch(new FormData(form)), { method: "get", replace: true, preventScrollReset: true }),
      pause,
    );
  };
  return (
    <>
      <PageHeader
        title="Session shelf"
        lead="Sessions written in percent of threshold, ready to drag onto a season plan."
        actions={
          <>
            <a href="/api/sessions?download=1" className={buttonClass("secondary")} download>
              Export all
            </a>
            <Link to="/coach/sessions/new" className={buttonClass("primary")}>
              New session
            </Link>
          </>
        }
      />
      <Form
        method="get"
        role="search"
        aria-label="Filter sessions"
        className="mb-4 grid gap-3 rounded-xl border border-line bg-white p-4 sm:grid-cols-2 lg:grid-cols-[2fr_1fr_1fr_1fr_auto_auto]"
        onChange={(e) =>
          apply(e.currentTarget, e.target instanceof HTMLInputElement && e.target.type === "search" ? 250 : 0)
        }
        onSubmit={(e) => {
          e.preventDefault();
          apply(e.currentTarget, 0);
        }}
      >
        <label className="flex flex-col gap-1 text-sm">
          <span className="font-medium">Search</span>
          <input
            type="search"
            name="q"
            defaultValue={filter.q ?? ""}
            placeholder="Name, description or tag"
            className="rounded-lg border border-line px-3 py-2"
          />
        </label>
        <label className="flex flex-col gap-1 text-sm">
          <span className="font-medium">Sport</span>
          <select
            name="sport"
            defaultValue={filter.sport ?? ""}
            className="rounded-lg border border-line bg-white px-3 py-2"
          >
            <option value="">All sports</option>
            {SPORTS.map((s) => (
              <option key={s} value={s}>
                {SPORT_LABEL[s]}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm">
          <span className="font-medium">Tag</span>
          <select
            name="tag"
            defaultValue={filter.tag ?? ""}
            className="rounded-lg border border-line bg-white px-3 py-2"
          >
            <option value="">All tags</option>
            {tags.map((t) => (
              <option key={t} value={t}>
                {t}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col gap-1 text-sm">
          <span className="font-medium">Sort by</span>
          <select name="sort" defaultValue={filter.sort} className="rounded-lg border border-line bg-white px-3 py-2">
            <option value="name">Name</option>
            <option value="updated">Last changed</option>
            <option value="duration">Duration</option>
          </select>
        </label>
        <label className="flex items-end gap-2 pb-2 text-sm">
          <input type="checkbox" name="archived" value="1" defaultChecked={filter.archived} /> Archived
        </label>
        <button type="submit" className={buttonClass("secondary", "self-end py-2")}>
          Show
        </button>
      </Form>
      {act.data && (
        <div className="mb-4">
          <FormMessage tone={act.data.ok ? "ok" : "error"}>
            {act.data.message}
            {act.data.details.length > 0 && (
              <ul className="mt-2 list-disc pl-5">
                {act.data.details.map((d) => (
                  <li key={d}>{d}</li>
                ))}
              </ul>
            )}
          </FormMessage>
        </div>
      )}
      <p className="sr-only" role="status" aria-live="polite">
        {loading ? "Loading sessions" : `${sessions.length} sessions shown`}
      </p>
      {sessions.length === 0 ? (
        <Card>
          <p className="text-ink-soft">No sessions match. Change the filters or create a new session.</p>
        </Card>
      ) : (
        <ul className={`grid gap-4 sm:grid-cols-2 xl:grid-cols-3 ${loading ? "opacity-60" : ""}`} aria-label="Sessions">
          {sessions.map((s) => (
            <li key={s.id}>
              <SessionCard session={s} fetcher={act} />
            </li>
          ))}
        </ul>
      )}
      <ImportForm fetcher={act} />
    </>
  );
}
