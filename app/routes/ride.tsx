import { useState } from "react";
import { Link, useFetcher } from "react-router";
import { RideChart } from "~/components/ride-chart";
import { buttonClass } from "~/components/ui/button";
import { Card, PageHeader } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { requireAthleteSubject, requireUpload } from "~/.server/access";
import { notFound } from "~/.server/http";
import { pageFailure } from "~/.server/replies";
import { rideAnalysis, saveLaps } from "~/.server/services/ride";
import type { Route } from "./+types/ride";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.ride.name ?? "Ride"} · Pacewright` }];

async function subjectUpload(request: Request, params: { athleteId?: string; id: string }) {
  const { athlete, base, viewer } = await requireAthleteSubject(request, params.athleteId);
  const { upload } = await requireUpload(viewer, params.id);
  // A coach's URL names the athlete too: a file of another of their athletes is not on this page.
  if (upload.athleteId !== athlete.id) notFound("No ride file with this id.");
  return { athlete, upload, base };
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const { athlete, upload, base } = await subjectUpload(request, params);
  return { base, ...(await rideAnalysis(athlete, upload)) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { upload } = await subjectUpload(request, params);
  const form = await request.formData();
  try {
    await saveLaps(upload, { splits: form.get("splits"), efforts: form.getAll("effort") });
    return { ok: true, message: "Laps saved." };
  } catch (err) {
    return pageFailure(err, (e) => ({ ok: false, message: e.message }));
  }
}

const clock = (s: number) => {
  const r = Math.round(s);
  const h = Math.floor(r / 3600);
  const m = Math.floor((r % 3600) / 60);
  return `${h ? `${h}:${String(m).padStart(2, "0")}` : m}:${String(r % 60).padStart(2, "0")}`;
};
const w = (v: number | null) => (v === null ? "—" : `${Math.round(v)} W`);
const bpm = (v: number | null) => (v === null ? "—" : `${Math.round(v)}`);

export default function Ride({ loaderData: d }: Route.ComponentProps) {
  const fetcher = useFetcher<{ ok: boolean; message: string }>();
  const fileSplits = d.laps.slice(1).map((l) => l.startS);
  const [text, setText] = useState(fileSplits.map(clock).join(", "));
  const splits = parseSplits(text).filter((v) => v > 0 && v < d.ride.durationS);
  const addSplit = (s: number) =>
    setText(
      [...new Set([...splits, s])]
        .sort((a, b) => a - b)
        .map(clock)
        .join(", "),
    );
  const changed = splits.join() !== fileSplits.join();
  return (
    <>
      <p className="mb-2 text-sm">
        <Link to={d.base === "/athlete" ? "/athlete/uploads" : `${d.base}/calendar`} className="text-teal underline">
          Ride files
        </Link>{" "}
        / {d.ride.name}
      </p>
      <PageHeader
        title={d.ride.name}
        lead={`${d.ride.date} · ${clock(d.ride.durationS)}${d.ride.avgPower !== null ? ` · ${Math.round(d.ride.avgPower)} W average` : ""}${d.ride.workKj !== null ? ` · ${Math.round(d.ride.workKj)} kJ` : ""}`}
        actions={
          <>
            <a className={buttonClass("secondary", "py-1.5")} href={`/api/rides/${d.ride.id}/ride.csv`} download>
              1 Hz data (CSV)
            </a>
            {d.curve.length > 0 && (
              <a
                className={buttonClass("secondary", "py-1.5")}
                href={`/api/rides/${d.ride.id}/power-curve.csv`}
                download
              >
                Power curve (CSV)
              </a>
            )}
            <a className={buttonClass("ghost", "py-1.5")} href={`/api/rides/${d.ride.id}`}>
              JSON
            </a>
          </>
        }
      />
      <div className="flex flex-col gap-6">
        <Card>
          <RideChart
            trace={d.trace}
            splitsS={splits}
            onSplit={addSplit}
            wPrimeKj={d.wPrime ? d.wPrime.wPrimeJ / 1000 : null}
          />
          {d.wPrime ? (
            <p className="mt-1 text-xs text-ink-soft" data-testid="wbal-note">
              W′ balance from your critical power {d.wPrime.cpW} W and W′ {(d.wPrime.wPrimeJ / 1000).toFixed(1)} kJ
              (test of {d.wPrime.testedOn}); lowest {d.wPrime.minKj} kJ. Integral model of Skiba et al. (2012), recovery
              time constant {d.wPrime.tauS} s for this ride.
            </p>
          ) : (
            <p className="mt-1 text-xs text-ink-soft">Save a critical-power test to see W′ balance under the trace.</p>
          )}
          <p className="mt-1 text-xs text-ink-soft">Click the trace to add a lap split.</p>
        </Card>
        <Card className="overflow-x-auto">
          <h2 className="font-semibold">Laps</h2>
          <fetcher.Form method="post" className="mt-2 flex flex-col gap-3 text-sm">
            <label className="flex flex-col gap-1">
              <span className="font-medium">Lap splits (m:ss, separated by commas)</span>
              <input
                name="splits"
                value={text}
                onChange={(e) => setText(e.target.value)}
                className="num rounded-lg border border-line px-2 py-1.5"
                placeholder="10:00, 30:00"
              />
            </label>
            {changed && <p className="text-xs text-ink-soft">Save to see the lap table for these splits.</p>}
            {d.laps.length > 0 ? (
              <table className="num w-full text-sm" data-testid="lap-table">
                <thead className="text-left text-xs text-ink-soft">
                  <tr>
                    <th className="py-1 pr-2 font-medium">Lap</th>
                    <th className="py-1 pr-2 font-medium">Time</th>
                    <th className="py-1 pr-2 font-medium">Mean</th>
                    <th className="py-1 pr-2 font-medium">Peak</th>
                    <th className="py-1 pr-2 font-medium">HR</th>
                    <th className="py-1 pr-2 font-medium">HR rise</th>
                    <th className="py-1 font-medium">Effort (0–10)</th>
                  </tr>
                </thead>
                <tbody>
                  {d.laps.map((l) => (
                    <tr key={`${l.lap}-${l.startS}`} className="border-t border-line">
                      <td className="py-1 pr-2">{l.lap}</td>
                      <td className="py-1 pr-2">{clock(l.durationS)}</td>
                      <td className="py-1 pr-2">{w(l.meanPowerW)}</td>
                      <td className="py-1 pr-2">{w(l.peakPowerW)}</td>
                      <td className="py-1 pr-2">{bpm(l.meanHr)}</td>
                      <td className="py-1 pr-2">
                        {l.hrRiseBpm === null ? "—" : `${l.hrRiseBpm > 0 ? "+" : ""}${Math.round(l.hrRiseBpm)}`}
                      </td>
                      <td className="py-1">
                        <input
                          name="effort"
                          type="number"
                          min={0}
                          max={10}
                          step={1}
                          defaultValue={l.effortScore ?? ""}
                          aria-label={`Effort score of lap ${l.lap}`}
                          className="w-16 rounded border border-line px-1.5 py-0.5"
                        />
                      </td>
                    </tr>
                  ))}
                </tbody>
              </table>
            ) : (
              <p className="text-ink-soft">
                This file marks no laps. Click the trace or type the split times to mark them.
              </p>
            )}
            <div>
              <button className={buttonClass("primary", "py-1.5")} disabled={fetcher.state !== "idle"}>
                Save laps
              </button>
            </div>
            {fetcher.data && <FormMessage tone={fetcher.data.ok ? "ok" : "error"}>{fetcher.data.message}</FormMessage>}
          </fetcher.Form>
        </Card>
        {d.load && (
          <Card>
            <h2 className="font-semibold">
              Band load <span className="num">{d.load.value}</span>
            </h2>
            <p className="text-xs text-ink-soft">
              Minutes in each power band (against {Math.round(d.load.thresholdW)} W) × the band's weight: its place from
              the bottom, 1 for the easiest. When the ride has no effort score, this is the load the load page counts
              for it. Pacewright's own measure, after Edwards' zone weighting.
            </p>
            <ul className="num mt-2 grid grid-cols-[1fr_auto_auto] gap-x-4 text-sm" data-testid="band-load">
              {d.load.rows.map((r) => (
                <li key={r.name} className="contents">
                  <span>{r.name}</span>
                  <span className="text-right">{r.minutes} min</span>
                  <span className="text-right text-ink-soft">× {r.weight}</span>
                </li>
              ))}
            </ul>
          </Card>
        )}
      </div>
    </>
  );
}

function parseSplits(text: string): number[] {
  const out: number[] = [];
  for (const part of text.split(/[,\s]+/).filter(Boolean)) {
    const m = /^(?:(\d+):)?(\d+):(\d{2})$|^(\d+)$/.exec(part);
    if (!m) continue;
    out.push(m[4] !== undefined ? Number(m[4]) : Number(m[1] ?? 0) * 3600 + Number(m[2]) * 60 + Number(m[3]));
  }
  return out;
}
