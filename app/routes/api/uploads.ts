import { requireAthleteFor, uploadFor } from "~/.server/access";
import { requireUser } from "~/.server/auth";
import { Upload } from "~/.server/models";
import { storedTrace, storeUpload } from "~/.server/services/uploads";
import { readUploadBody } from "./uploads.server";
import { jsonResponse as json } from "~/.server/http";
import { jsonFailure } from "~/.server/replies";
import type { Route } from "./+types/uploads";

/** Upload history as JSON; `?id=` adds that file's light trace for charts. A coach passes `athleteId`. */
export async function loader({ request }: Route.LoaderArgs) {
  const viewer = await requireUser(request);
  const url = new URL(request.url);
  const athlete = await requireAthleteFor(viewer, url.searchParams.get("athleteId"));
  const id = Number(url.searchParams.get("id"));
  if (id) {
    const upload = (await uploadFor(viewer, id))?.upload;
    if (!upload || upload.athleteId !== athlete.id) return json({ error: "No such upload." }, 404);
    try {
      return json({ upload: view(upload), trace: await storedTrace(upload) });
    } catch (err) {
      return jsonFailure(err);
    }
  }
  const uploads = await Upload.findAll({
    where: { athleteId: athlete.id },
    order: [["createdAt", "DESC"]],
    limit: 100,
  });
  return json({ uploads: uploads.map(view) });
}

function view(u: Upload) {
  return {
    id: u.id,
    name: u.originalName,
    format: u.format,
    size: u.size,
    createdAt: u.createdAt.toISOString(),
    summary: u.summary,
  };
}

/** One ride file (field "file", at most 25 MB, CSV / GPX / FIT); answers the summary and a trace, or why not. */
export async function action({ request }: Route.ActionArgs) {
  const viewer = await requireUser(request);
  const url = new URL(request.url);
  const athlete = await requireAthleteFor(viewer, url.searchParams.get("athleteId"));
  try {
    const { upload, trace } = await storeUpload(await readUploadBody(request), athlete, viewer);
    return json({ upload: view(upload), trace }, 201);
  } catch (err) {
    return jsonFailure(err);
  }
}
