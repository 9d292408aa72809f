import { useEffect, useMemo, useState } from "react";
import { requireJson } from "~/.server/http";
import { data, Link, redirect, useFetcher } from "react-router";
import { z } from "zod";
import { TraceChart } from "~/components/trace-chart";
import { UploadBox, type UploadResult } from "~/components/upload-box";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { saveTest, TestError } from "~/.server/services/field-tests";
import { athleteSubject } from "~/.server/subject";
import { todayIn } from "~/lib/dates";
import { protocolSchema } from "~/lib/field-tests";
import { PROTOCOLS, PROTOCOL_KEYS, READINESS, type ProtocolKey } from "~/lib/protocols";
import type { Route } from "./+types/test-new";

export const meta: Route.MetaFunction = () => [{ title: "New field test · Pacewright" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { athlete, base, viewer } = await athleteSubject(request, params.athleteId);
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
});

export async function action({ request, params }: Route.ActionArgs) {
  const { athlete, viewer, base } = await athleteSubject(request, params.athleteId);
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
    if (err instanceof TestError) return data({ error: err.message, field: err.field }, { status: err.status });
    throw err;
  }
}

type Preview = {
  proposed: { sport: string; metric: string; value: number; unit: string; label: string; details: Record<string, unknown> };
  current: { label: string; since: string } | null;
  changes: { sessions: number; blocks: number };
  examples: { date: string; name: string; before: string; after: string }[];
  window: { startS: number; lengthS: number } | null;
  pacing: { means: number[]; changePct: number; verdict: string } | null;
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
  const previewer = useFetcher<Preview>();
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
  const askPreview = () => previewer.submit(submission, { method: "post", action: `/api/tests/preview${athleteQuery}`, encType: "application/json" });
  useEffect(() => {
    if (source === "file" && upload) askPreview();
  }, [upload, windowStart, protocol]); // eslint-disable-line react-hooks/exhaustive-deps

  const preview = previewer.data && !previewer.data.error ? previewer.data : null;
  const save = () =>
    saver.submit({ ...submission, requestKey, readiness: p.maximal ? { answers, stopSignsRead: stopRead } : null }, { method: "post", encType: "application/json" });
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
                <UploadBox athleteId={forCoach ? athlete.id : undefined} onUploaded={(r) => { setUpload(r); setWindowStart(null); }} />
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
                      <p className="num text-sm">
                        Pacing in thirds: {preview.pacing.means.map((m) => `${Math.round(m)} W`).join(" · ")} — <strong>{preview.pacing.verdict}</strong>
                        {preview.pacing.verdict === "fading" && " (a fading effort usually means the start was too fast; the threshold may be a little low)"}
                      </p>
                    )}
                  </>
                )}
              </div>
            ) : (
              <div className="grid gap-4 sm:grid-cols-2">
                {protocol === "ramp" && field("bestOneMinuteW", "Best one-minute power (W)", { inputMode: "decimal" })}
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
                  <strong>{preview.changes.sessions}</strong> planned sessions ({preview.changes.blocks} steps) from {testedOn} will change.
                </p>
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
          {saver.data?.error && <FormMessage>{saver.data.error}</FormMessage>}
          <button type="button" className={buttonClass("primary", "py-2.5")} onClick={save} disabled={!preview || saver.state !== "idle"}>
            {saver.state !== "idle" ? "Saving…" : "Save and rescale"}
          </button>
        </aside>
      </div>
    </>
  );
}
