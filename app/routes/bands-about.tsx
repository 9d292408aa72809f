import { Link } from "react-router";
import { Card, PageHeader } from "~/components/ui/card";
import { bandSetTitle } from "~/lib/band-table";
import { BAND_SET_KEYS, bandShade, defaultBandSet, parseBandSetKey } from "~/lib/training";
import type { Route } from "./+types/bands-about";

export const meta: Route.MetaFunction = () => [{ title: "About these bands · Pacewright" }];

/** Where each default boundary comes from: a published source, or common practice where no single source gives it. */
const BASIS: Record<string, string> = {
  "bike:power:60": "common practice: easy spinning against steady aerobic riding, both in the moderate domain",
  "bike:power:80":
    "common practice for the first threshold (moderate → heavy); it lies near 75–85 % of critical power in trained riders (reviewed by Jamnick et al. 2020)",
  "bike:power:95": "common practice: about 5 % below threshold, the usual uncertainty of a field estimate",
  "bike:power:105": "common practice: about 5 % above threshold, where the severe domain begins (Gaesser & Poole 1996)",
  "bike:power:130":
    "common practice for severe → extreme: exhaustion before maximal oxygen uptake is reached (domain defined by Jamnick et al. 2020)",
  "bike:heart_rate:85": "common practice for the first threshold in % of threshold heart rate",
  "bike:heart_rate:92": "common practice: the middle of the heavy domain",
  "bike:heart_rate:96": "common practice: the ridge below threshold heart rate",
  "bike:heart_rate:101":
    "common practice: above threshold heart rate; no band above severe, because heart rate lags (Jamnick et al. 2020)",
  "run:heart_rate:86": "common practice: running sits slightly higher than cycling in % of threshold heart rate",
  "run:heart_rate:92": "common practice: the middle of the heavy domain",
  "run:heart_rate:96": "common practice: the ridge below threshold heart rate",
  "run:heart_rate:101": "common practice: above threshold heart rate; no band above severe (heart rate lags)",
  "run:pace:82": "common practice for the first threshold in % of threshold speed",
  "run:pace:90": "common practice: the middle of the heavy domain",
  "run:pace:96": "common practice: about 4 % below threshold speed",
  "run:pace:104": "common practice: above threshold speed, the severe domain",
  "run:pace:115": "common practice: short fast running, the extreme domain",
  "swim:pace:84":
    "common practice for the first threshold in % of critical swim speed (Wakayoshi et al. 1992; Ginn 1993)",
  "swim:pace:92": "common practice: the middle of the heavy domain",
  "swim:pace:97":
    "common practice: about 3 % below critical swim speed; swim bands are narrower because speed rises far less than effort",
  "swim:pace:103": "common practice: above critical swim speed, the severe domain",
  "swim:pace:110": "common practice: short fast swimming, the extreme domain",
};

export default function AboutBands() {
  return (
    <>
      <PageHeader
        title="About these bands"
        lead="How Pacewright's default intensity bands are built, where each boundary comes from, and how to read them."
      />
      <div className="grid gap-6 lg:grid-cols-[1fr_22rem]">
        <div className="flex flex-col gap-6">
          <Card>
            <h2 className="font-semibold">The idea</h2>
            <p className="mt-2 text-sm">
              Exercise physiology describes four intensity domains. In the <em>moderate</em> domain, below the first
              lactate or ventilatory threshold, effort settles quickly and can be held for hours. In the <em>heavy</em>{" "}
              domain, between that threshold and the maximal metabolic steady state (close to critical power), effort
              still settles but slowly. In the <em>severe</em> domain above it, oxygen uptake climbs to its maximum and
              exhaustion follows within minutes. In the
              <em> extreme</em> domain, exhaustion comes before maximal oxygen uptake is even reached. The distribution
              of training across three zones (below the first threshold, between the two, above the second) is the same
              picture seen from the coach's side.
            </p>
            <p className="mt-2 text-sm">
              Pacewright's default bands split these domains into named bands of its own. Your threshold (the 100 %
              mark) approximates the boundary between heavy and severe, so the band called Ridge sits around it. Heart
              rate gets no band above severe: it lags behind effort by tens of seconds to minutes and cannot show short
              bursts.
            </p>
            <p className="mt-2 text-sm">
              <strong>Boundaries:</strong> each band includes its lower boundary and stops just below its upper one; the
              top band is open. With the default power bands, 80 % is Heavy and 79.9 % is Steady. Pace bands are
              percentages of threshold <em>speed</em>, so a faster pace is a higher percentage.
            </p>
          </Card>
          {BAND_SET_KEYS.map((key) => {
            const set = defaultBandSet(key);
            const { sport, metric } = parseBandSetKey(key)!;
            return (
              <Card key={key}>
                <h2 className="font-semibold">{bandSetTitle(sport, metric)}: defaults</h2>
                <table className="num mt-2 w-full text-left text-sm">
                  <thead className="text-ink-soft">
                    <tr>
                      <th className="py-1 font-medium">Band</th>
                      <th className="py-1 font-medium">% of threshold{metric === "pace" ? " speed" : ""}</th>
                      <th className="hidden py-1 font-medium sm:table-cell">Lower boundary, from</th>
                    </tr>
                  </thead>
                  <tbody>
                    {set.bands.map((b, i) => (
                      <tr key={b.name} className="border-t border-line/60 align-top">
                        <td className="py-1 pr-2">
                          <span
                            className="mr-2 inline-block h-3 w-3 rounded-sm align-middle"
                            style={{
                              background: bandShade(i, set.bands.length),
                              boxShadow: b.fromPct >= 100 ? "inset 0 0 0 1.5px var(--color-brick)" : undefined,
                            }}
                            aria-hidden
                          />
                          <span className="font-medium">{b.name}</span>
                          <span className="block text-xs text-ink-soft">{b.meaning}</span>
                          <span className="mt-0.5 block text-xs italic text-ink-soft sm:hidden">
                            {i === 0 ? "starts at 0" : (BASIS[`${key}:${b.fromPct}`] ?? "common practice")}
                          </span>
                        </td>
                        <td className="whitespace-nowrap py-1 pr-2">
                          {b.toPct === null ? `${b.fromPct} % and above` : `${b.fromPct} to under ${b.toPct} %`}
                        </td>
                        <td className="hidden py-1 text-xs text-ink-soft sm:table-cell">
                          {i === 0 ? "starts at 0" : (BASIS[`${key}:${b.fromPct}`] ?? "common practice")}
                        </td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </Card>
            );
          })}
        </div>
        <aside className="flex flex-col gap-4">
          <Card>
            <h2 className="font-semibold">Sources</h2>
            <ul className="mt-2 flex list-disc flex-col gap-2 pl-4 text-sm">
              <li>
                Gaesser GA, Poole DC (1996). The slow component of oxygen uptake kinetics in humans. Exercise and Sport
                Sciences Reviews 24:35–71.
              </li>
              <li>
                Jamnick NA, Pettitt RW, Granata C, Pyne DB, Bishop DJ (2020). An examination and critique of current
                methods to determine exercise intensity. Sports Medicine 50:1729–1756.
              </li>
              <li>
                Seiler KS, Kjerland GØ (2006). Quantifying training intensity distribution in elite endurance athletes.
                Scandinavian Journal of Medicine & Science in Sports 16:49–56.
              </li>
            </ul>
            <p className="mt-2 text-xs text-ink-soft">
              The domains come from these papers; the exact percentages are common practice, chosen by Pacewright, and a
              coach may change them. Guidance for training, not medical advice.
            </p>
          </Card>
          <Card>
            <h2 className="font-semibold">Band load</h2>
            <p className="mt-2 text-sm">
              A ride with power but no effort score still counts on the load page: its <strong>band load</strong> is the
              minutes in each power band times the band's weight, its place from the bottom (1 for the easiest, 2 for
              the next …). An hour in the second band is 120. Pacewright's own measure, after the zone weighting of
              Edwards (1993, <em>The Heart Rate Monitor Book</em>). Once an effort score is typed, effort score ×
              minutes (Foster 2001) is counted instead.
            </p>
          </Card>
          <Card>
            <h2 className="font-semibold">Coaches</h2>
            <p className="mt-2 text-sm">
              Coaches can rename bands, move their boundaries and use 3 to 8 bands per sport and metric; their athletes
              then see the coach's bands everywhere.{" "}
              <Link to="/coach/bands" className="text-teal underline">
                Edit bands
              </Link>
            </p>
          </Card>
        </aside>
      </div>
    </>
  );
}
