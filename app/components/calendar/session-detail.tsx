import { useFetcher } from "react-router";
import { SessionProfile } from "~/components/session-profile";
import { buttonClass } from "~/components/ui/button";
import { Card } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { formatDay } from "~/lib/dates";
import { formatMinutes } from "~/lib/duration";
import { EFFORT_WORDS } from "~/lib/effort";
import { PROTOCOLS, READINESS, type ProtocolKey } from "~/lib/protocols";
import { blockLines, type BlockBand } from "~/lib/schedule-text";
import { BandTable } from "~/components/band-table";
import type { sessionPageData } from "~/.server/services/session-page";
import { type FormAnswer, useSchemaForm } from "~/lib/forms";
import { completeSchema } from "~/lib/session-forms";

/** A scheduled session as the session page's loader sends it (services/session-page.ts). */
export type SessionDetailData = Omit<Awaited<ReturnType<typeof sessionPageData>>, "pacing">;

/** `subjectName`: on a coach's view, the athlete whose session this is, so headings speak of them, not of "you". */
export function SessionDetail({
  data,
  canComplete,
  subjectName,
}: {
  data: SessionDetailData;
  canComplete: boolean;
  subjectName?: string;
}) {
  const whose = subjectName ? `${subjectName}'s` : "Your";
  const { session: s, steps, zones } = data;
  const bandOfBlock = new Map((data.bandsByBlock ?? []).map((b) => [b.blockIndex, b]));
  const lines = blockLines(steps);
  const profile = steps.map((st, i) => ({
    s: steps.slice(0, i).reduce((t, x) => t + x.durationS, 0),
    d: st.durationS,
    lo: st.lowPct,
    hi: st.highPct,
    ramp: st.ramp,
  }));
  const protocol = s.testProtocol ? PROTOCOLS[s.testProtocol as ProtocolKey] : null;
  return (
    <div className="grid gap-6 lg:grid-cols-[1fr_22rem]">
      <div className="flex flex-col gap-6">
        <Card>
          <p className="num text-sm text-ink-soft">
            {formatDay(s.date, { weekday: "long", day: "numeric", month: "long", year: "numeric" })}
            {s.timeOfDay && ` · ${s.timeOfDay}`} · {formatMinutes(s.plannedDurationS)} ·{" "}
            <span className="capitalize">{s.status}</span>
          </p>
          <SessionProfile
            steps={profile}
            height={96}
            className="mt-3 rounded bg-paper/60"
            label={`Profile of ${s.name}`}
          />
          <ol className="num mt-4 flex flex-col gap-2">
            {lines.map((l) => (
              <li key={l.blockIndex} className="flex flex-wrap items-baseline gap-2">
                <span className="font-medium">{l.text}</span>
                {bandOfBlock.get(l.blockIndex) && <BandChip band={bandOfBlock.get(l.blockIndex)!} />}
                {l.needsTest && (
                  <span className="rounded bg-brick/10 px-1.5 text-xs text-brick">
                    needs a field test: shown in % of threshold
                  </span>
                )}
              </li>
            ))}
          </ol>
          {s.description && (
            <p className="mt-4 text-sm whitespace-pre-wrap" data-testid="session-description">
              {s.description}
            </p>
          )}
          {s.notes && (
            <div
              className="mt-4 rounded-lg border-l-4 border-teal bg-teal/5 px-3 py-2 text-sm"
              data-testid="coach-note"
            >
              <p className="text-xs font-medium text-teal-dark">
                {subjectName ? "Your note for this session" : "Note from your coach"}
              </p>
              <p className="whitespace-pre-wrap">{s.notes}</p>
            </div>
          )}
        </Card>
        {protocol && (
          <Card className="border-brick/40">
            <h2 className="font-semibold text-brick">Before this field test</h2>
            <p className="mt-1 text-sm">{protocol.instructions}</p>
            <p className="mt-3 text-sm font-medium">Stop at once if you notice:</p>
            <ul className="mt-1 list-disc pl-5 text-sm">
              {READINESS.stopSigns.map((x) => (
                <li key={x}>{x}</li>
              ))}
            </ul>
            <p className="mt-2 text-xs text-ink-soft">{READINESS.stopAdvice}</p>
          </Card>
        )}
        {zones.map((z) => (
          <BandTable key={z.key} title={`${whose} ${z.title.charAt(0).toLowerCase()}${z.title.slice(1)}`} table={z} />
        ))}
      </div>
      <aside className="flex flex-col gap-4">
        {s.status === "done" && <PlannedVsActual session={s} />}
        {data.timeInBand && <TimeInBand rows={data.timeInBand} />}
        {canComplete ? <CompleteForm session={s} /> : <ResultCard session={s} />}
      </aside>
    </div>
  );
}

function BandChip({ band }: { band: BlockBand }) {
  return (
    <span className="inline-flex items-center gap-1 rounded border border-line px-1.5 text-xs" data-testid="block-band">
      <span
        className="inline-block h-2.5 w-2.5 rounded-sm"
        style={{
          background: band.shade,
          boxShadow: band.aboveThreshold ? "inset 0 0 0 1.5px var(--color-brick)" : undefined,
        }}
        aria-hidden
      />
      {band.name}
    </span>
  );
}

function TimeInBand({ rows }: { rows: { metric: string; name: string; shade: string; minutes: number }[] }) {
  const total = rows.reduce((a, r) => a + r.minutes, 0) || 1;
  return (
    <Card>
      <h2 className="font-semibold">Time in band</h2>
      <p className="text-xs text-ink-soft">
        From the attached ride file: {rows[0]?.metric === "power" ? "power" : "heart rate"} against your threshold on
        the day.
      </p>
      <ul className="num mt-2 flex flex-col gap-1 text-sm" data-testid="time-in-band">
        {rows.map((r) => (
          <li key={r.name} className="grid grid-cols-[7rem_1fr_3.5rem] items-center gap-2">
            <span>{r.name}</span>
            <span
              className="h-2 rounded"
              style={{ width: `${(r.minutes / total) * 100}%`, background: r.shade, minWidth: r.minutes > 0 ? 2 : 0 }}
            />
            <span className="text-right">{formatMinutes(r.minutes * 60)}</span>
          </li>
        ))}
      </ul>
    </Card>
  );
}

function PlannedVsActual({ session: s }: { session: SessionDetailData["session"] }) {
  return (
    <Card>
      <h2 className="font-semibold">Planned and done</h2>
      <dl className="num mt-2 grid grid-cols-2 gap-1 text-sm" data-testid="planned-vs-actual">
        <dt className="text-ink-soft">Planned</dt>
        <dd className="text-right">{formatMinutes(s.plannedDurationS)}</dd>
        <dt className="text-ink-soft">Done</dt>
        <dd className="text-right">{s.actualMinutes ? formatMinutes(s.actualMinutes * 60) : "—"}</dd>
        {s.targetedS ? (
          <>
            <dt className="text-ink-soft">Time in target</dt>
            <dd className="text-right">
              {formatMinutes(s.inTargetS ?? 0)} of {formatMinutes(s.targetedS)} (
              {Math.round(((s.inTargetS ?? 0) / s.targetedS) * 100)} %)
            </dd>
          </>
        ) : null}
      </dl>
      {!s.targetedS && (
        <p className="mt-2 text-xs text-ink-soft">Attach the ride file to see time in target and time in band.</p>
      )}
    </Card>
  );
}

function ResultCard({ session: s }: { session: SessionDetailData["session"] }) {
  return (
    <Card>
      <h2 className="font-semibold">Result</h2>
      {s.status === "done" ? (
        <p className="mt-2 text-sm">
          Done{s.actualMinutes ? ` in ${Math.round(s.actualMinutes)} min` : ""}
          {s.effortScore !== null ? `, effort ${s.effortScore} (${EFFORT_WORDS[s.effortScore]})` : ""}.
        </p>
      ) : (
        <p className="mt-2 text-sm text-ink-soft capitalize">{s.status}</p>
      )}
      {s.comment && <p className="mt-2 text-sm italic">“{s.comment}”</p>}
    </Card>
  );
}

function CompleteForm({ session: s }: { session: SessionDetailData["session"] }) {
  const fetcher = useFetcher<FormAnswer>();
  const [form, fields] = useSchemaForm(completeSchema, fetcher.data, { id: "complete-session" });
  const saved = fetcher.data?.message;
  const errors = { effortScore: fields.effortScore.errors?.[0], minutes: fields.minutes.errors?.[0] };
  return (
    <Card>
      <h2 className="font-semibold">How did it go?</h2>
      <fetcher.Form
        method="post"
        id={form.id}
        onSubmit={form.onSubmit}
        className="mt-3 flex flex-col gap-3 text-sm"
        noValidate
      >
        {form.errors?.[0] ? (
          <FormMessage>{form.errors[0]}</FormMessage>
        ) : (
          saved && <FormMessage tone="ok">{saved}</FormMessage>
        )}
        <fieldset>
          <legend className="font-medium">Effort score</legend>
          <div className="mt-1 grid grid-cols-1 gap-0.5">
            {EFFORT_WORDS.map((w, i) => (
              <label key={i} className="flex items-center gap-2 rounded px-1 py-0.5 has-[:checked]:bg-teal/10">
                <input type="radio" name="effortScore" value={i} defaultChecked={s.effortScore === i} />
                <span className="num w-5 text-right font-medium">{i}</span> {w}
              </label>
            ))}
          </div>
          {errors.effortScore && <p className="text-brick">{errors.effortScore}</p>}
        </fieldset>
        <label className="flex flex-col gap-1">
          <span className="font-medium">Minutes</span>
          <input
            name="minutes"
            type="number"
            min={1}
            max={1440}
            defaultValue={s.actualMinutes ?? Math.round(s.plannedDurationS / 60)}
            className="num rounded-lg border border-line px-2 py-1.5"
          />
          {errors.minutes && <span className="text-brick">{errors.minutes}</span>}
        </label>
        <label className="flex flex-col gap-1">
          <span className="font-medium">Comment (optional)</span>
          <textarea
            name="comment"
            rows={2}
            maxLength={1000}
            defaultValue={s.comment ?? ""}
            className="rounded-lg border border-line px-2 py-1.5"
          />
        </label>
        <div className="flex flex-wrap gap-2">
          <button name="status" value="done" className={buttonClass("primary")} disabled={fetcher.state !== "idle"}>
            Mark done
          </button>
          <button
            name="status"
            value="skipped"
            className={buttonClass("secondary")}
            disabled={fetcher.state !== "idle"}
          >
            Skipped it
          </button>
          {s.status !== "planned" && (
            <button name="status" value="planned" className={buttonClass("ghost")} disabled={fetcher.state !== "idle"}>
              Undo
            </button>
          )}
        </div>
      </fetcher.Form>
    </Card>
  );
}
