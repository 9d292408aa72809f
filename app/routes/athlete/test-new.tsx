import { useEffect, useMemo, useState } from "react";
import { requireJson } from "~/.server/http";
import { data, Link, redirect, useFetcher } from "react-router";
import { z } from "zod";
import { TraceChart } from "~/components/trace-chart";
import { CpFitChart } from "~/components/cp-fit-chart";
import { UploadBox, type UploadResult } from "~/components/upload-box";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { requireAthleteSubject } from "~/.server/access";
import { pageFailure } from "~/.server/replies";
import { saveTest } from "~/.server/services/field-tests";
import { todayIn } from "~/lib/dates";
import { protocolSchema } from "~/lib/field-tests";
import { PROTOCOLS, PROTOCOL_KEYS, READINESS, type ProtocolKey } from "~/lib/protocols";
import { USUAL_RAMP_RATE_W_PER_MIN } from "~/lib/training";
import type { Route } from "./+types/test-new";

export const meta: Route.MetaFunction = () => [{ title: "New field test · Pacewright" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { athlete, base, viewer } = await requireAthleteSubject(request, params.athleteId);
  return { athlete: { id: athlete.id, name: athlete.name }, base, forCoach: viewer.id !== athlete.id, today: todayIn(athlete.timezone) };
}

const saveSchema = z.object({
  protocol: protocolSchema,
  inputs: z.unknown().optional(),
  uploadId: z.number().int().positive().nullish(),
  windowStartS: z.number().int().min(0).nullish(),
  testedOn: z.string(),
  readiness: z.unknown().optional(),
  requestKey: z.string().max(64).nullish(),
  confirmed: z.boolean().nullish(),
});

export async function action({ request, params }: Route.ActionArgs) {
  const { athlete, viewer, base } = await requireAthleteSubject(request, params.athleteId);
  requireJson(request);
  let body: unknown;
  try {
    body = await request.json();
  } catch {
    return data({ error: "The test could not be read; reload and try again.", field: undefined as string | undefined }, { status: 400 });
  }
  const parsed = saveSchema.safeParse(body);
  if (!parsed.success) return data({ error: parsed.error.issues[0].message, field: undefined as string | undefined }, { status: 400 });
  try {
    const { test } = await saveTest(athlete, viewer, parsed.data);
    return redirect(`${base}/tests?saved=${test.id}`);
  } catch (err) {
    return pageFailure(err, (e) => ({ error: e.message, field: e.field }));
  }
}

type Preview = {
  proposed: { sport: string; metric: string; value: number; unit: string; label: string; details: Record<string, unknown> };
  current: { label: string; since: string } | null;
  changes: { sessions: number; blocks: number };
  examples: { date: string; name: string; before: string; after: string }[];
  window: { startS: number; lengthS: number } | null;
  pacing: { means: number[]; changePct: number; verdict: string; advice: string | null } | null;
  ramp: {
    rateWPerMin: number;
    withinUsual: boolean;
    detected: { stepW: number; stepS: number; steps: number; firstStepW: number; lastCompletedStepW: number; failedIntoStepS: number } | null;
  } | null;
  fit: { cpW: number; wPrimeJ: number; r2: number; points: { durationS: number; meanPowerW: number; workJ: number; fittedWorkJ: number }[] } | null;
  guard: { flagged: boolean; changePct: number | null; headline: string | null; reasons: string[] };
  error?: string;
};

const FILE_PROTOCOLS: ProtocolKey[] = ["ramp", "twenty_minute", "eight_minute", "critical_power", "hr_thirty"];

export default function NewTest({ loaderData }: Route.ComponentProps) {
  const { athlete, base, forCoach, today } = loaderData;
  const [protocol, setProtocol] = useState<ProtocolKey>("twenty_minute");
  const [testedOn, setTestedOn] = useState(today);
  const [source, setSource] = useState<"typed" | "file">("typed");
  const [fields, setFields] = useState<Record<string, string>>({});
  const [efforts, setEfforts] = useState([{ duration: "3:00", meanW: "" }, { duration: "12:00", meanW: "" }]);
  const [upload, setUpload] = useState<UploadResult | null>(null);
  const [windowStart, setWindowStart] = useState<number | null>(null);
  const [answers, setAnswers] = useState<(("yes" | "no") | null)[]>(READINESS.questions.map(() => null));
  const [stopRead, setStopRead] = useState(false);
  const [requestKey] = useState(() => (typeof crypto !== "undefined" && "randomUUID" in crypto ? crypto.randomUUID() : String(Math.random())));
  // A fresh fetcher per file: a new upload starts with no proposal, whatever the last file gave.
  const [fileRound, setFileRound] = useState(0);
  const previewer = useFetcher<Preview>({ key: `test-preview-${fileRound}` });
  const [previewedFor, setPreviewedFor] = useState<string | null>(null);
  const [confirmed, setConfirmed] = useState(false);
  const saver = useFetcher<{ error: string; field?: string }>();
  const p = PROTOCOLS[protocol];
  const athleteQuery = forCoach ? `?athleteId=${athlete.id}` : "";
  const anyYes = answers.includes("yes");

  useEffect(() => {
    if (!FILE_PROTOCOLS.includes(protocol)) setSource("typed");
  }, [protocol]);

  const inputs = useMemo(() => {
    if (protocol === "critical_power") return { efforts: efforts.filter((e) => e.meanW !== "") };
    if (protocol === "hr_thirty") return { sport: fields.sport ?? "bike", meanHr: fields.meanHr };
    if (protocol === "manual") return { sport: fields.sport ?? "bike", metric: fields.metric ?? "power", value: fields.value };
    return fields;
  }, [protocol, fields, efforts]);

  const submission = {
    protocol,
    testedOn,
    ...(source === "file" && upload ? { uploadId: upload.upload.id, windowStartS: windowStart } : { inputs }),
  };
  const submissionKey = JSON.stringify(submission);
  const askPreview = () => {
    setPreviewedFor(submissionKey);
    previewer.submit(submission, { method: "post", action: `/api/tests/preview${athleteQuery}`, encType: "application/json" });
  };
  useEffect(() => {
    if (source === "file" && upload) askPreview();
  }, [upload, windowStart, protocol, testedOn, source]); // eslint-disable-line react-hooks/exhaustive-deps
  // A confirmation is for the change the person saw; any edit asks for it again.
  useEffect(() => setConfirmed(false), [submissionKey]);

  // A proposal counts only for exactly what is on the form now (a typed value edited after preview is not previewed).
  const preview = previewer.data && !previewer.data.error && previewedFor === submissionKey ? previewer.data : null;
  const needsConfirm = Boolean(preview?.guard.flagged);
  const resetFile = () => {
    setUpload(null);
    setWindowStart(null);
    setPreviewedFor(null);
    setFileRound((n) => n + 1);
  };
  const save = () =>
    saver.submit(
      { ...submission, requestKey, confirmed: needsConfirm ? confirmed : null, readiness: p.maximal ? { answers, stopSignsRead: stopRead } : null },
      { method: "post", encType: "application/json" },
    );
  const field = (name: string, label: string, props: React.InputHTMLAttributes<HTMLInputElement> = {}) => (
    <label className="flex flex-col gap-1 text-sm">
      <span className="font-medium">{label}</span>
      <input value={fields[name] ?? ""} onChange={(e) => setFields({ ...fields, [name]: e.target.value })} className="num rounded-lg border border-line px-3 py-2" {...props} />
    </label>
  );

  return (
    <>
      <p className="mb-2 text-sm">
        <Link to={`${base}/tests`} className="text-teal underline">
          Field tests
        </Link>{" "}
        / New
      </p>
      <PageHeader title={forCoach ? `New field test for ${athlete.name}` : "New field test"} lead="Log a result; Pacewright proposes the new threshold, shows what will change, and rescales every future target when you save." />
      <div className="grid gap-6 lg:grid-cols-[1fr_24rem]">
        <div className="flex flex-col gap-6">
          <Card>
            <div className="grid gap-4 sm:grid-cols-2">
              <label className="flex flex-col gap-1 text-sm">
                <span className="font-medium">Test</span>
                <select aria-label="Test" value={protocol} onChange={(e) => setProtocol(e.target.value as ProtocolKey)} className="rounded-lg border border-line bg-white px-3 py-2">
                  {PROTOCOL_KEYS.map((k) => (
                    <option key={k} value={k}>
                      {PROTOCOLS[k].label}
                    </option>
                  ))}
                </select>
              </label>
              <label className="flex flex-col gap-1 text-sm">
                <span className="font-medium">Date of the test</span>
                <input type="date" value={testedOn} max={today} onChange={(e) => setTestedOn(e.target.value)} className="rounded-lg border border-line px-3 py-2" />
              </label>
            </div>
            <p className="mt-3 text-sm text-ink-soft">{p.instructions}</p>
          </Card>

          {p.maximal && (
            <Card className="border-brick/40" aria-labelledby="readiness-heading">
              <h2 id="readiness-heading" className="font-semibold text-brick">
                Readiness screening
              </h2>
              <p className="mt-1 text-sm">This is a maximal test. Answer each question honestly before you go all-out.</p>
              <ol className="mt-3 flex flex-col gap-2 text-sm">
                {READINESS.questions.map((q, i) => (
                  <li key={q} className="flex flex-wrap items-center justify-between gap-2">
                    <span className="flex-1">{q}</span>
                    <span className="flex gap-3" role="radiogroup" aria-label={q}>
                      {(["no", "yes"] as const).map((a) => (
                        <label key={a} className="flex items-center gap-1">
                          <input type="radio" name={`q${i}`} checked={answers[i] === a} onChange={() => setAnswers(answers.map((x, k) => (k === i ? a : x)))} /> {a}
                        </label>
                      ))}
                    </span>
                  </li>
                ))}
              </ol>
              {anyYes && (
                <div className="mt-3">
                  <FormMessage>{READINESS.yesAdvice}</FormMessage>
                </div>
              )}
              <div className="mt-4 rounded-lg bg-brick/5 p-3 text-sm">
                <p className="font-medium">Stop at once if you notice:</p>
                <ul className="mt-1 list-disc pl-5">
                  {READINESS.stopSigns.map((x) => (
                    <li key={x}>{x}</li>
                  ))}
                </ul>
                <p className="mt-2 text-xs text-ink-soft">{READINESS.stopAdvice}</p>
                <label className="mt-3 flex items-center gap-2 font-medium">
                  <input type="checkbox" checked={stopRead} onChange={(e) => setStopRead(e.target.checked)} /> I have read the stop signs
                </label>
              </div>
            </Card>
          )}

          <Card>
            {FILE_PROTOCOLS.includes(protocol) && (
              <fieldset className="mb-4 flex gap-4 text-sm">
                <legend className="mb-1 font-medium">Result from</legend>
                <label className="flex items-center gap-2">
                  <input type="radio" checked={source === "typed"} onChange={() => setSource("typed")} /> numbers I type
                </label>
                <label className="flex items-center gap-2">
                  <input type="radio" checked={source === "file"} onChange={() => setSource("file")} /> a ride file
                </label>
              </fieldset>
            )}
            {source === "file" ? (
              <div className="flex flex-col gap-4">
                <UploadBox
                  athleteId={forCoach ? athlete.id : undefined}
                  onStart={resetFile}
                  onFailed={resetFile}
                  onUploaded={(r) => {
                    setUpload(r);
                    setWindowStart(null);
                  }}
                />
                {upload && (
                  <>
                    <TraceChart trace={upload.trace} window={preview?.window} />
                    {preview?.window && (protocol === "twenty_minute" || protocol === "eight_minute" || protocol === "hr_thirty") && (
                      <label className="flex flex-col gap-1 text-sm">
                        <span className="font-medium">
                          Test window starts at <span className="num">{Math.floor(preview.window.startS / 60)}:{String(preview.window.startS % 60).padStart(2, "0")}</span> (shift it if the detection is off)
                        </span>
                        <input
                          type="range"
                          min={0}
                          max={Math.max(0, upload.upload.summary.durationS - preview.window.lengthS)}
                          step={10}
                          value={windowStart ?? preview.window.startS}
                          onChange={(e) => setWindowStart(Number(e.target.value))}
                          aria-label="Start of the test window in seconds"
                        />
                      </label>
                    )}
                    {preview?.pacing && (
                      <div className="flex flex-col gap-1 text-sm" data-testid="pacing">
                        <p className="num">
                          Pacing in thirds: {preview.pacing.means.map((m) => `${Math.round(m)} W`).join(" · ")} — <strong>{preview.pacing.verdict}</strong>
                        </p>
                        {preview.pacing.advice && <p className="rounded-lg bg-brick/5 p-2 text-ink">{preview.pacing.advice}</p>}
                      </div>
                    )}
                  </>
                )}
              </div>
            ) : (
              <div className="grid gap-4 sm:grid-cols-2">
                {protocol === "ramp" && (
                  <>
                    {field("bestOneMinuteW", "Best one-minute power (W)", { inputMode: "decimal" })}
                    {field("rampRateWPerMin", "Ramp rate (W added per minute)", { inputMode: "decimal", placeholder: "20" })}
                  </>
                )}
                {protocol === "twenty_minute" && field("meanW", "20-minute mean power (W)", { inputMode: "decimal" })}
                {protocol === "eight_minute" && (
                  <>
                    {field("meanW", "First 8-minute mean power (W)", { inputMode: "decimal" })}
                    {field("secondMeanW", "Second 8-minute mean power (W, optional)", { inputMode: "decimal" })}
                  </>
                )}
                {protocol === "critical_power" &&
                  efforts.map((e, i) => (
                    <div key={i} className="grid grid-cols-2 gap-2 sm:col-span-2">
                      <label className="flex flex-col gap-1 text-sm">
                        <span className="font-medium">Effort {i + 1} duration</span>
                        <input value={e.duration} onChange={(ev) => setEfforts(efforts.map((x, k) => (k === i ? { ...x, duration: ev.target.value } : x)))} className="num rounded-lg border border-line px-3 py-2" />
                      </label>
                      <label className="flex flex-col gap-1 text-sm">
                        <span className="font-medium">Effort {i + 1} mean power (W)</span>
                        <input value={e.meanW} inputMode="decimal" onChange={(ev) => setEfforts(efforts.map((x, k) => (k === i ? { ...x, meanW: ev.target.value } : x)))} className="num rounded-lg border border-line px-3 py-2" />
                      </label>
                    </div>
                  ))}
                {protocol === "critical_power" && efforts.length < 4 && (
                  <button type="button" className={buttonClass("ghost", "justify-self-start")} onClick={() => setEfforts([...efforts, { duration: "6:00", meanW: "" }])}>
                    + Add an effort
                  </button>
                )}
                {protocol === "hr_thirty" && (
                  <>
                    <label className="flex flex-col gap-1 text-sm">
                      <span className="font-medium">Sport</span>
                      <select value={fields.sport ?? "bike"} onChange={(e) => setFields({ ...fields, sport: e.target.value })} className="rounded-lg border border-line bg-white px-3 py-2">
                        <option value="bike">Bike</option>
                        <option value="run">Run</option>
                      </select>
                    </label>
                    {field("meanHr", "Mean heart rate, last 20 minutes (bpm)", { inputMode: "numeric" })}
                  </>
                )}
                {protocol === "run_race" && (
                  <>
                    {field("distanceM", "Race distance (m)", { inputMode: "numeric", placeholder: "5000" })}
                    {field("time", "Race time (h:mm:ss or m:ss)", { placeholder: "20:30" })}
                  </>
                )}
                {protocol === "swim_pair" && (
                  <>
                    {field("t400", "400 m time (m:ss)", { placeholder: "6:00" })}
                    {field("t200", "200 m time (m:ss)", { placeholder: "2:50" })}
                  </>
                )}
                {protocol === "manual" && (
                  <>
                    <label className="flex flex-col gap-1 text-sm">
                      <span className="font-medium">Sport</span>
                      <select value={fields.sport ?? "bike"} onChange={(e) => setFields({ ...fields, sport: e.target.value })} className="rounded-lg border border-line bg-white px-3 py-2">
                        <option value="bike">Bike</option>
                        <option value="run">Run</option>
                        <option value="swim">Swim</option>
                      </select>
                    </label>
                    <label className="flex flex-col gap-1 text-sm">
                      <span className="font-medium">Threshold of</span>
                      <select value={fields.metric ?? "power"} onChange={(e) => setFields({ ...fields, metric: e.target.value })} className="rounded-lg border border-line bg-white px-3 py-2">
                        <option value="power">power (W)</option>
                        <option value="heart_rate">heart rate (bpm)</option>
                        <option value="pace">pace (s per km, or per 100 m for swimming)</option>
                      </select>
                    </label>
                    {field("value", "Value", { inputMode: "decimal" })}
                  </>
                )}
                <button type="button" className={buttonClass("secondary", "justify-self-start sm:col-span-2")} onClick={askPreview} disabled={previewer.state !== "idle"}>
                  {previewer.state !== "idle" ? "Working…" : "Preview the change"}
                </button>
              </div>
            )}
          </Card>
        </div>

        <aside className="flex flex-col gap-4 lg:sticky lg:top-4 lg:self-start" aria-label="Proposal">
          <Card>
            <h2 className="font-semibold">Proposal</h2>
            {previewer.data?.error && (
              <div className="mt-2">
                <FormMessage>{previewer.data.error}</FormMessage>
              </div>
            )}
            {preview ? (
              <div className="mt-2 flex flex-col gap-2 text-sm" data-testid="proposal">
                <p className="num text-2xl font-semibold text-teal-dark">{preview.proposed.label}</p>
                <p className="num text-ink-soft">
                  {preview.current ? `now ${preview.current.label}, since ${preview.current.since}` : "no threshold of this kind yet"}
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
              !previewer.data?.error && <p className="mt-2 text-sm text-ink-soft">Enter the result (or upload the file) and preview it.</p>
            )}
          </Card>
          {preview?.guard.flagged && (
            <Card className="border-brick/60" aria-labelledby="guard-heading" data-testid="guard">
              <h2 id="guard-heading" className="font-semibold text-brick">
                Check before saving
              </h2>
              <p className="mt-1 text-sm">{preview.guard.headline}</p>
              {preview.guard.reasons.length > 0 && (
                <>
                  <p className="mt-2 text-sm font-medium">Likely reasons</p>
                  <ul className="mt-1 flex list-disc flex-col gap-1 pl-5 text-sm">
                    {preview.guard.reasons.map((r) => (
                      <li key={r}>{r}</li>
                    ))}
                  </ul>
                </>
              )}
              <label className="mt-3 flex items-start gap-2 text-sm font-medium">
                <input type="checkbox" className="mt-1" checked={confirmed} onChange={(e) => setConfirmed(e.target.checked)} />
                <span>I have read these reasons and want this threshold to replace the current one.</span>
              </label>
            </Card>
          )}
          {saver.data?.error && <FormMessage>{saver.data.error}</FormMessage>}
          <button type="button" className={buttonClass("primary", "py-2.5")} onClick={save} disabled={!preview || (needsConfirm && !confirmed) || saver.state !== "idle"}>
            {saver.state !== "idle" ? "Saving…" : "Save and rescale"}
          </button>
        </aside>
      </div>
    </>
  );
}

function RampFacts({ ramp }: { ramp: NonNullable<Preview["ramp"]> }) {
  const d = ramp.detected;
  const { low, high } = USUAL_RAMP_RATE_W_PER_MIN;
  return (
    <div className="num rounded-lg bg-paper p-2 text-xs" data-testid="ramp-facts">
      {d && (
        <p>
          Found {d.steps} steps of {Math.round(d.stepW)} W every {d.stepS} s, from {Math.round(d.firstStepW)} W; last completed step {Math.round(d.lastCompletedStepW)} W
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
