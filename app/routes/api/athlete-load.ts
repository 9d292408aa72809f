import Papa from "papaparse";
import { requireUser } from "~/.server/auth";
import { requireAthleteFor } from "~/.server/access";
import { loadSeries } from "~/.server/services/load";
import { powerCurveComparison } from "~/.server/services/load-figures";
import { addDays, daysBetween, isIsoDate, todayIn } from "~/lib/dates";
import type { Route } from "./+types/athlete-load";

/**
 * An athlete's load series as JSON (or CSV with `format=csv`) between `from` and `to` (at most three years). The
 * athlete themself and their coaches may read it; anyone else gets 404.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const viewer = await requireUser(request);
  // An athlete reads only their own series; asking for another id looks exactly like asking for a made-up one.
  if (viewer.role === "athlete" && String(viewer.id) !== params.id) return new Response("Not found", { status: 404 });
  const athlete = viewer.role === "athlete" ? viewer : await requireAthleteFor(viewer, params.id);
  const url = new URL(request.url);
  const today = todayIn(athlete.timezone);
  const from = url.searchParams.get("from") ?? addDays(today, -89);
  const to = url.searchParams.get("to") ?? addDays(today, 28);
  if (!isIsoDate(from) || !isIsoDate(to) || to < from)
    return Response.json({ error: "Give from and to as dates like 2027-01-04, with to after from." }, { status: 400 });
  if (daysBetween(from, to) > 3 * 366)
    return Response.json({ error: "Ask for at most three years at a time." }, { status: 400 });
  const series = await loadSeries(athlete, from, to);
  if (url.searchParams.get("format") === "csv") {
    // One column of ride minutes per power band of the athlete's band set, named after the band.
    const bandCols = series.bands.map(
      (b, i) =>
        `minutes_${
          b.name
            .toLowerCase()
            .replace(/[^a-z0-9]+/g, "_")
            .replace(/^_|_$/g, "") || `band_${i + 1}`
        }`,
    );
    const fields = [
      "date",
      "done_load",
      "of_which_power_load",
      "planned_load",
      "trimp",
      "work_kj",
      "fitness",
      "fatigue",
      "balance",
      "acute_chronic_rolling",
      "acute_chronic_ewma",
      ...bandCols,
    ];
    const rows = series.daily.map((d) => [
      d.date,
      d.effortLoad,
      d.powerLoad,
      d.plannedLoad,
      d.trimp,
      d.workKj,
      d.fitness,
      d.fatigue,
      d.balance,
      d.acwrRolling ?? "",
      d.acwrEwma ?? "",
      ...d.bandMinutes,
    ]);
    return new Response(Papa.unparse({ fields, data: rows }, { newline: "\n" }) + "\n", {
      headers: {
        "Content-Type": "text/csv; charset=utf-8",
        "Content-Disposition": `attachment; filename="pacewright-load-${from}-${to}.csv"`,
        "Cache-Control": "private, no-store",
      },
    });
  }
  return Response.json(
    { ...series, powerCurve: url.searchParams.get("curve") === "0" ? [] : await powerCurveComparison(athlete) },
    { headers: { "Cache-Control": "private, no-store" } },
  );
}
