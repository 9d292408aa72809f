/** One session on the coach's shelf: its profile, tags and use, with duplicate and archive/delete through the shelf's fetcher. */
import { type FetcherWithComponents, Link } from "react-router";
import { SessionProfile } from "~/components/session-profile";
import { buttonClass } from "~/components/ui/button";
import type { ShelfSessionSummary } from "~/.server/services/shelf";
import { formatMinutes } from "~/lib/duration";
import { SPORT_LABEL, type Sport } from "~/lib/sessions";

/** The shelf page's fetcher; the cards and the import form only submit through it, the page reads its answer. */
export type ShelfFetcher = FetcherWithComponents<unknown>;

export function SessionCard({ session: s, fetcher }: { session: ShelfSessionSummary; fetcher: ShelfFetcher }) {
  return (
    <article className="flex h-full flex-col rounded-xl border border-line bg-white p-4 shadow-sm">
      <div className="flex items-start justify-between gap-2">
        <h2 className="font-semibold">
          <Link to={`/coach/sessions/${s.id}`} className="hover:text-teal hover:underline">
            {s.name}
          </Link>
        </h2>
        <span className="num shrink-0 rounded-full bg-paper-deep px-2 py-0.5 text-xs">
          {SPORT_LABEL[s.sport as Sport] ?? s.sport} · {formatMinutes(s.durationS)}
        </span>
      </div>
      <SessionProfile steps={s.profile} className="mt-3 rounded bg-paper/60" label={`Profile of ${s.name}`} />
      {s.description && <p className="mt-2 line-clamp-2 text-sm text-ink-soft">{s.description}</p>}
      <div className="mt-2 flex flex-wrap gap-1">
        {s.testProtocol && <span className="rounded-full bg-brick/15 px-2 py-0.5 text-xs text-brick">field test</span>}
        {s.tags.map((t) => (
          <span key={t} className="rounded-full bg-teal/10 px-2 py-0.5 text-xs text-teal-dark">
            {t}
          </span>
        ))}
      </div>
      <div className="mt-auto flex flex-wrap items-center gap-2 pt-3 text-sm">
        <span className="mr-auto text-xs text-ink-soft">
          {s.usedIn ? `In plans ${s.usedIn}×` : "Not in a plan yet"}
        </span>
        <fetcher.Form method="post">
          <input type="hidden" name="sessionId" value={s.id} />
          <button name="intent" value="duplicate" className={buttonClass("ghost", "px-2 py-1")}>
            Duplicate
          </button>
          {s.archived ? (
            <button name="intent" value="unarchive" className={buttonClass("ghost", "px-2 py-1")}>
              Restore
            </button>
          ) : (
            <button
              name="intent"
              value="remove"
              className={buttonClass("ghost", "px-2 py-1 text-brick")}
              aria-label={`Delete ${s.name}`}
            >
              {s.usedIn ? "Archive" : "Delete"}
            </button>
          )}
        </fetcher.Form>
      </div>
    </article>
  );
}
