import { Card } from "~/components/ui/card";
import type { runningPacesFor } from "~/.server/services/running-paces";

/** The paces as the server builds them (services/running-paces.ts); only shown when the athlete has a running index. */
export type RunningPacesView = NonNullable<Awaited<ReturnType<typeof runningPacesFor>>>;

const pace = (s: number) => `${Math.floor(s / 60)}:${String(s % 60).padStart(2, "0")}`;

/** Training paces per running index, with the % of threshold speed to type into a session's pace target. */
export function RunningPacesCard({ paces }: { paces: RunningPacesView }) {
  return (
    <Card data-testid="running-paces">
      <h2 className="font-semibold">Running paces</h2>
      <p className="text-xs text-ink-soft">
        From a running index of {paces.index} (race of {paces.testedOn}; Daniels' training intensities). As a session
        target, use the % of threshold speed.
      </p>
      <table className="num mt-2 w-full text-sm">
        <thead className="text-left text-xs text-ink-soft">
          <tr>
            <th className="py-1 pr-2 font-medium">Pace</th>
            <th className="py-1 pr-2 font-medium">per km</th>
            <th className="py-1 font-medium">% of threshold speed</th>
          </tr>
        </thead>
        <tbody>
          {paces.rows.map((r) => (
            <tr key={r.key} className="border-t border-line">
              <td className="py-1 pr-2">{r.name}</td>
              <td className="py-1 pr-2 whitespace-nowrap">
                {r.slowS === r.fastS ? pace(r.slowS) : `${pace(r.slowS)}–${pace(r.fastS)}`}
              </td>
              <td className="py-1 whitespace-nowrap">
                {r.lowPct === r.highPct ? `${r.lowPct} %` : `${r.lowPct}–${r.highPct} %`}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </Card>
  );
}
