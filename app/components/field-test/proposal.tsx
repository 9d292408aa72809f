import { CpFitChart } from "~/components/cp-fit-chart";
import { Card } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { USUAL_RAMP_RATE_W_PER_MIN } from "~/lib/training";
import type { preview } from "~/.server/services/field-test-proposal";

/** What `/api/tests/preview` answers (its JSON is the service's result as is). */
export type TestPreview = Awaited<ReturnType<typeof preview>>;

/** The proposed threshold beside the current one, and what saving would change. */
export function ProposalCard({
  preview,
  error,
  testedOn,
}: {
  preview: TestPreview | null;
  error?: string;
  testedOn: string;
}) {
  return (
    <Card>
      <h2 className="font-semibold">Proposal</h2>
      {error && (
        <div className="mt-2">
          <FormMessage>{error}</FormMessage>
        </div>
      )}
      {preview ? (
        <div className="mt-2 flex flex-col gap-2 text-sm" data-testid="proposal">
          <p className="num text-2xl font-semibold text-teal-dark">{preview.proposed.label}</p>
          <p className="num text-ink-soft">
            {preview.current
              ? `now ${preview.current.label}, since ${preview.current.since}`
              : "no threshold of this kind yet"}
          </p>
          <p className="num">
            <strong>{preview.changes.sessions}</strong> planned sessions from {testedOn} get new targets.
          </p>
          {preview.ramp && <RampFacts ramp={preview.ramp} />}
          {preview.fit && <CpFitChart fit={preview.fit} />}
          {preview.examples.length > 0 && (
            <ul className="num flex flex-col gap-1 text-xs">
              {preview.examples.map((e) => (
                <li key={`${e.date}-${e.name}`}>
                  {e.date} {e.name}: {e.before} → <strong>{e.after}</strong>
                </li>
              ))}
            </ul>
          )}
        </div>
      ) : (
        !error && <p className="mt-2 text-sm text-ink-soft">Enter the result (or upload the file) and preview it.</p>
      )}
    </Card>
  );
}

/** A flagged change: the reasons it may be wrong, and the explicit confirmation the save needs. */
export function GuardCard({
  guard,
  confirmed,
  onConfirmed,
}: {
  guard: TestPreview["guard"];
  confirmed: boolean;
  onConfirmed: (c: boolean) => void;
}) {
  return (
    <Card className="border-brick/60" aria-labelledby="guard-heading" data-testid="guard">
      <h2 id="guard-heading" className="font-semibold text-brick">
        Check before saving
      </h2>
      <p className="mt-1 text-sm">{guard.headline}</p>
      {guard.reasons.length > 0 && (
        <>
          <p className="mt-2 text-sm font-medium">Likely reasons</p>
          <ul className="mt-1 flex list-disc flex-col gap-1 pl-5 text-sm">
            {guard.reasons.map((r) => (
              <li key={r}>{r}</li>
            ))}
          </ul>
        </>
      )}
      <label className="mt-3 flex items-start gap-2 text-sm font-medium">
        <input type="checkbox" className="mt-1" checked={confirmed} onChange={(e) => onConfirmed(e.target.checked)} />
        <span>I have read these reasons and want this threshold to replace the current one.</span>
      </label>
    </Card>
  );
}

function RampFacts({ ramp }: { ramp: NonNullable<TestPreview["ramp"]> }) {
  const d = ramp.detected;
  const { low, high } = USUAL_RAMP_RATE_W_PER_MIN;
  return (
    <div className="num rounded-lg bg-paper p-2 text-xs" data-testid="ramp-facts">
      {d && (
        <p>
          Found {d.steps} steps of {Math.round(d.stepW)} W every {d.stepS} s, from {Math.round(d.firstStepW)} W; last
          completed step {Math.round(d.lastCompletedStepW)} W
          {d.failedIntoStepS > 0 ? `, stopped ${d.failedIntoStepS} s into the next` : ""}.
        </p>
      )}
      <p className={ramp.withinUsual ? "" : "font-medium text-brick"}>
        Ramp rate {Math.round(ramp.rateWPerMin * 10) / 10} W per minute:{" "}
        {ramp.withinUsual
          ? `within the usual ${low}–${high} W per minute, so the 75 % rule applies (common practice).`
          : `outside the usual ${low}–${high} W per minute, so the 75 % rule does not hold; confirm with another test.`}
      </p>
    </div>
  );
}
