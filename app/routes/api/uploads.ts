import { requireUser } from "~/.server/auth";
import { Upload } from "~/.server/models";
import { calendarSubject } from "~/.server/services/calendar";
import { receiveUpload, storedTrace, UploadError } from "~/.server/services/uploads";
import { jsonResponse as json } from "~/.server/http";
import type { Route } from "./+types/uploads";


/** Upload history as JSON; `?id=` adds that file's light trace for charts. A coach passes `athleteId`. */
export async function loader({ request }: Route.LoaderArgs) {
  const viewer = await requireUser(request);
  const url = new URL(request.url);
  const athlete = await calendarSubject(viewer, url.searchParams.get("athleteId"));
  const id = Number(url.searchParams.get("id"));
  if (id) {
    const upload = await Upload.findOne({ where: { id, athleteId: athlete.id } });
    if (!upload) return json({ error: "No such upload." }, 404);
    try {
      return json({ upload: view(upload), trace: await storedTrace(upload) });
    } catch (err) {
      if (err instanceof UploadError) return json({ error: err.message }, err.status);
      throw err;
    }
  }
  const uploads = await Upload.findAll({ where: { athleteId: athlete.id }, order: [["createdAt", "DESC"]], limit: 100 });
  return json({ uploads: uploads.map(view) });
}

function view(u: Upload) {
  return { id: u.id, name: u.originalName, format: u.format, size: u.size, createdAt: u.createdAt.toISOString(), summary: u.summary };
}

/** One ride file (field "file", at most 25 MB, CSV / GPX / FIT); answers the summary and a trace, or why not. */
export async function action({ request }: Route.ActionArgs) {
  const viewer = await requireUser(request);
  const url = new URL(request.url);
  const athlete = await calendarSubject(viewer, url.searchParams.get("athleteId"));
  try {
    const { upload, trace } = await receiveUpload(request, athlete, viewer);
    return json({ upload: view(upload), trace }, 201);
  } catch (err) {
    if (err instanceof UploadError) return json({ error: err.message }, err.status);
    throw err;
  }
}
