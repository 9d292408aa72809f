import { useState } from "react";
import { Form, Link, useNavigation } from "react-router";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { requireRole } from "~/.server/auth";
import { bandSetsFor, restoreDefaultBandSet, saveBandSet } from "~/.server/services/bands";
import { BANDS_NOT_SAVED, bandSetSchema, restoreBandsSchema } from "~/lib/band-forms";
import { bandSetTitle } from "~/lib/band-table";
import { accepted, parseSubmission, refuse, useSchemaForm } from "~/lib/forms";
import {
  BAND_SET_KEYS,
  bandShade,
  MAX_BANDS,
  MIN_BANDS,
  parseBandSetKey,
  type BandInputRow,
  type BandSetKey,
} from "~/lib/training";
import type { Route } from "./+types/bands";

export const meta: Route.MetaFunction = () => [{ title: "Intensity bands · Pacewright" }];

function chosenKey(url: string): BandSetKey {
  const key = new URL(url).searchParams.get("set") ?? "bike:power";
  return parseBandSetKey(key) ? (key as BandSetKey) : "bike:power";
}

export async function loader({ request }: Route.LoaderArgs) {
  const coach = await requireRole(request, "coach");
  const sets = await bandSetsFor(coach);
  const key = chosenKey(request.url);
  return {
    key,
    tabs: BAND_SET_KEYS.map((k) => ({
      key: k,
      title: bandSetTitle(parseBandSetKey(k)!.sport, parseBandSetKey(k)!.metric),
      isDefault: sets[k].isDefault,
    })),
    set: sets[key],
  };
}

export async function action({ request }: Route.ActionArgs) {
  const coach = await requireRole(request, "coach");
  const form = await request.formData();
  if (form.get("intent") === "restore") {
    const submission = parseSubmission(form, restoreBandsSchema);
    if (submission.status !== "success") return refuse(submission);
    if (!(await restoreDefaultBandSet(coach, submission.value.set)))
      return refuse(submission, { form: "Choose a band set." });
    return accepted(submission, "Back to Pacewright's default bands.", { reset: false });
  }
  const submission = parseSubmission(form, bandSetSchema);
  if (submission.status !== "success") return refuse(submission);
  const result = await saveBandSet(coach, submission.value.set, submission.value.bands);
  if (!result.ok) return refuse(submission, { form: result.errors.form ?? BANDS_NOT_SAVED });
  return accepted(submission, "Saved. Your athletes see these bands from now on.", { reset: false });
}

const toInput = (b: { name: string; fromPct: number; toPct: number | null; meaning: string }): BandInputRow => ({
  name: b.name,
  fromPct: String(b.fromPct),
  toPct: b.toPct === null ? "" : String(b.toPct),
  meaning: b.meaning,
});

export default function BandSettings({ loaderData, actionData }: Route.ComponentProps) {
  const { key, tabs, set } = loaderData;
  const reply = actionData;
  const failed = reply && reply.status !== "success" ? reply : null;
  // Without scripts the refused rows come back in the reply, to be shown as typed.
  const typedRows = (failed?.initialValue as { bands?: Partial<BandInputRow>[] } | null | undefined)?.bands?.map(
    (r) => ({ name: r.name ?? "", fromPct: r.fromPct ?? "", toPct: r.toPct ?? "", meaning: r.meaning ?? "" }),
  );
  const [rows, setRows] = useState<BandInputRow[]>(() => (typedRows?.length ? typedRows : set.bands.map(toInput)));
  const busy = useNavigation().state !== "idle";
  // A new set chosen, or a save/restore answered: show what the server now holds (or what was typed, on refusal).
  const [shownFor, setShownFor] = useState({ key, set, failed });
  if (shownFor.key !== key || shownFor.set !== set || shownFor.failed !== failed) {
    setShownFor({ key, set, failed });
    setRows(typedRows?.length ? typedRows : set.bands.map(toInput));
  }
  const [form] = useSchemaForm(bandSetSchema, reply, { id: `bands-${key}` });
  const errorOf = (i: number, f: keyof BandInputRow) => form.allErrors[`bands[${i}].${f}`]?.[0];
  const rowHasError = Object.keys(form.allErrors).some((k) => k.startsWith("bands["));
  const saved = reply && "message" in reply ? reply.message : undefined;
  // The browser's check stops a wrong set before it is sent, so it says the action's words itself.
  const formErrors = form.errors ?? [];
  const refused = formErrors[0] ?? (rowHasError ? BANDS_NOT_SAVED : undefined);
  const update = (i: number, field: keyof BandInputRow, value: string) =>
    setRows((rs) => {
      const next = rs.map((r, j) => (j === i ? { ...r, [field]: value } : r));
      // Typing a band's upper boundary moves the next band's start with it, so the set stays contiguous by default.
      if (field === "toPct" && i + 1 < next.length) next[i + 1] = { ...next[i + 1], fromPct: value };
      return next;
    });
  const addBand = () =>
    setRows((rs) => {
      if (rs.length >= MAX_BANDS) return rs;
      const last = rs[rs.length - 1];
      const from = Number(last?.fromPct) || 100;
      const split = String(from + 20);
      return [...rs.slice(0, -1), { ...last, toPct: split }, { name: "", fromPct: split, toPct: "", meaning: "" }];
    });
  const removeBand = (i: number) =>
    setRows((rs) => {
      if (rs.length <= MIN_BANDS) return rs;
      const next = rs.filter((_, j) => j !== i);
      if (i > 0 && i < rs.length) next[i - 1] = { ...next[i - 1], toPct: i < next.length ? next[i].fromPct : "" };
      return next;
    });
  const input = "num w-full rounded-lg border bg-white px-2 py-1.5 text-sm";
  return (
    <>
      <PageHeader
        title="Intensity bands"
        lead="The bands your athletes see on their sessions, charts, exports and calendar feed. Boundaries are % of threshold (for pace: % of threshold speed)."
      />
      <nav aria-label="Band sets" className="mb-4 flex flex-wrap gap-2">
        {tabs.map((t) => (
          <Link
            key={t.key}
            to={`?set=${t.key}`}
            aria-current={t.key === key ? "page" : undefined}
            className={buttonClass(t.key === key ? "primary" : "secondary", "px-3 py-1 text-sm")}
          >
            {t.title}
            {!t.isDefault && " · edited"}
          </Link>
        ))}
      </nav>
      <div className="grid gap-6 lg:grid-cols-[1fr_18rem]">
        <Card>
          <Form method="post" id={form.id} onSubmit={form.onSubmit} className="flex flex-col gap-3" noValidate>
            <input type="hidden" name="set" value={key} />
            {(refused ?? saved) && <FormMessage tone={refused ? "error" : "ok"}>{refused ?? saved}</FormMessage>}
            {formErrors.slice(1).map((m) => (
              <p key={m} role="alert" className="text-sm text-brick">
                {m}
              </p>
            ))}
            <p className="text-xs text-ink-soft">
              Each band runs from its lower boundary up to, but not including, its upper one; the top band is open.{" "}
              {MIN_BANDS}–{MAX_BANDS} bands.
            </p>
            <ol className="flex flex-col gap-3" data-testid="band-rows">
              {rows.map((r, i) => {
                const e = {
                  name: errorOf(i, "name"),
                  fromPct: errorOf(i, "fromPct"),
                  toPct: errorOf(i, "toPct"),
                  meaning: errorOf(i, "meaning"),
                };
                const id = `band-${i}`;
                return (
                  <li
                    key={i}
                    className="grid grid-cols-[1rem_1fr] gap-2 border-t border-line/60 pt-3 sm:grid-cols-[1rem_10rem_7.5rem_7.5rem_1fr_auto]"
                  >
                    <span
                      className="mt-7 inline-block h-4 w-4 rounded-sm"
                      style={{ background: bandShade(i, rows.length) }}
                      aria-hidden
                    />
                    <label className="flex flex-col gap-1 text-sm">
                      <span className="font-medium">Name</span>
                      <input
                        name={`bands[${i}].name`}
                        value={r.name}
                        onChange={(ev) => update(i, "name", ev.target.value)}
                        maxLength={40}
                        aria-invalid={e.name ? true : undefined}
                        aria-describedby={e.name ? `${id}-name` : undefined}
                        className={`${input} ${e.name ? "border-brick" : "border-line"}`}
                      />
                      {e.name && (
                        <span id={`${id}-name`} role="alert" className="text-brick">
                          {e.name}
                        </span>
                      )}
                    </label>
                    <label className="col-start-2 flex flex-col gap-1 text-sm sm:col-start-auto">
                      <span className="font-medium">From %</span>
                      <input
                        name={`bands[${i}].fromPct`}
                        inputMode="numeric"
                        value={r.fromPct}
                        onChange={(ev) => update(i, "fromPct", ev.target.value)}
                        aria-invalid={e.fromPct ? true : undefined}
                        aria-describedby={e.fromPct ? `${id}-from` : undefined}
                        className={`${input} ${e.fromPct ? "border-brick" : "border-line"}`}
                      />
                      {e.fromPct && (
                        <span id={`${id}-from`} role="alert" className="text-brick">
                          {e.fromPct}
                        </span>
                      )}
                    </label>
                    <label className="col-start-2 flex flex-col gap-1 text-sm sm:col-start-auto">
                      <span className="font-medium">To %</span>
                      <input
                        name={`bands[${i}].toPct`}
                        inputMode="numeric"
                        value={r.toPct}
                        placeholder={i === rows.length - 1 ? "open" : ""}
                        onChange={(ev) => update(i, "toPct", ev.target.value)}
                        aria-invalid={e.toPct ? true : undefined}
                        aria-describedby={e.toPct ? `${id}-to` : undefined}
                        className={`${input} ${e.toPct ? "border-brick" : "border-line"}`}
                      />
                      {e.toPct && (
                        <span id={`${id}-to`} role="alert" className="text-brick">
                          {e.toPct}
                        </span>
                      )}
                    </label>
                    <label className="col-start-2 flex flex-col gap-1 text-sm sm:col-start-auto">
                      <span className="font-medium">Meaning (one line)</span>
                      <input
                        name={`bands[${i}].meaning`}
                        value={r.meaning}
                        onChange={(ev) => update(i, "meaning", ev.target.value)}
                        maxLength={160}
                        className={`${input} ${e.meaning ? "border-brick" : "border-line"}`}
                      />
                      {e.meaning && (
                        <span role="alert" className="text-brick">
                          {e.meaning}
                        </span>
                      )}
                    </label>
                    <button
                      type="button"
                      onClick={() => removeBand(i)}
                      disabled={rows.length <= MIN_BANDS}
                      className={buttonClass("secondary", "col-start-2 self-end px-2 py-1 text-xs sm:col-start-auto")}
                      aria-label={`Remove band ${i + 1}`}
                    >
                      Remove
                    </button>
                  </li>
                );
              })}
            </ol>
            <div className="flex flex-wrap gap-2">
              <button
                type="button"
                onClick={addBand}
                disabled={rows.length >= MAX_BANDS}
                className={buttonClass("secondary")}
              >
                Add a band
              </button>
              <button type="submit" name="intent" value="save" disabled={busy} className={buttonClass("primary")}>
                Save bands
              </button>
              <button
                type="submit"
                name="intent"
                value="restore"
                formNoValidate
                disabled={busy || set.isDefault}
                className={buttonClass("secondary")}
              >
                Restore defaults
              </button>
            </div>
          </Form>
        </Card>
        <Card>
          <h2 className="font-semibold">What changes</h2>
          <p className="mt-2 text-sm">
            Saving changes what your athletes see: band names and shading on sessions and the board, time in band from
            ride files, the weekly minutes-per-band chart, the exported series and the calendar feed. Targets (watts,
            bpm, pace) and planned load do not move.
          </p>
          <p className="mt-2 text-sm">
            <Link to="/bands/about" className="text-teal underline">
              About the default bands and their sources
            </Link>
          </p>
        </Card>
      </div>
    </>
  );
}
