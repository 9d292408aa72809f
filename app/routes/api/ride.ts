import { requireUser } from "~/.server/auth";
import { notFound } from "~/.server/http";
import { requireUpload } from "~/.server/access";
import { curveCsv, lapsOf, RIDE_CSV_COLUMNS, rideCsv } from "~/.server/services/ride";
import { loadActivity, type UploadSummary } from "~/.server/services/uploads";
import type { Route } from "./+types/ride";

/**
 * The rider's own data. /api/rides/:id → JSON (the 1 Hz series the analysis used, the power curve, the laps);
 * /api/rides/:id/ride.csv and /api/rides/:id/power-curve.csv → the same as CSV. Owner and their coach only; 404 else.
 */
export async function loader({ request, params }: Route.LoaderArgs) {
  const viewer = await requireUser(request);
  const { upload } = await requireUpload(viewer, params.id);
  const summary = upload.summary as UploadSummary;
  const base =
    upload.originalName
      .replace(/\.[^.]+$/, "")
      .replace(/[^\w.-]+/g, "-")
      .slice(0, 60) || `ride-${upload.id}`;
  const file = params.file;
  if (file === "power-curve.csv") return csv(curveCsv(summary.curve ?? []), `${base}-power-curve.csv`);
  const activity = await loadActivity(upload);
  if (file === "ride.csv") return csv(rideCsv(activity), `${base}-1hz.csv`);
  if (file !== undefined) notFound("No such download.");
  const cell = (v: number | null | undefined, digits = 0) => (typeof v === "number" ? Number(v.toFixed(digits)) : null);
  return Response.json(
    {
      id: upload.id,
      name: upload.originalName,
      startTime: summary.startTime,
      durationS: summary.durationS,
      columns: RIDE_CSV_COLUMNS,
      samples: activity.samples.map((s) => [
        s.t,
        cell(s.power),
        cell(s.hr),
        cell(s.cadence),
        cell(s.speed, 3),
        cell(s.distance, 1),
      ]),
      powerCurve: (summary.curve ?? []).map((c) => ({ windowS: c.windowS, watts: Math.round(c.watts * 10) / 10 })),
      laps: lapsOf(upload, activity.samples.length),
    },
    { headers: { "Cache-Control": "private, no-store" } },
  );
}

function csv(body: string, name: string) {
  return new Response(body, {
    headers: {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Disposition": `attachment; filename="${name}"`,
      "Cache-Control": "private, no-store",
    },
  });
}
