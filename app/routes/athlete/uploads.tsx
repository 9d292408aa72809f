import { useState } from "react";
import { useRevalidator } from "react-router";
import { UploadBox } from "~/components/upload-box";
import { Card, PageHeader } from "~/components/ui/card";
import { requireRole } from "~/.server/auth";
import { Upload } from "~/.server/models";
import type { UploadSummary } from "~/.server/services/uploads";
import type { Route } from "./+types/uploads";

export const meta: Route.MetaFunction = () => [{ title: "Ride files · Pacewright" }];

export async function loader({ request }: Route.LoaderArgs) {
  const athlete = await requireRole(request, "athlete");
  const uploads = await Upload.findAll({
    where: { athleteId: athlete.id },
    order: [["createdAt", "DESC"]],
    limit: 100,
  });
  return {
    uploads: uploads.map((u) => {
      const s = u.summary as UploadSummary;
      return {
        id: u.id,
        name: u.originalName,
        format: u.format,
        size: u.size,
        createdAt: u.createdAt.toISOString(),
        durationS: s.durationS,
        workKj: s.workKj,
        avgPower: s.avgPower,
        avgHr: s.avgHr,
        best20: s.efforts?.["20min"]?.mean ?? null,
      };
    }),
  };
}

export default function Uploads({ loaderData }: Route.ComponentProps) {
  const revalidator = useRevalidator();
  const [last, setLast] = useState<string | null>(null);
  return (
    <>
      <PageHeader title="Ride files" lead="Upload a CSV, GPX or FIT file; field tests can read their result from it." />
      <div className="grid gap-6 lg:grid-cols-[22rem_1fr]">
        <Card>
          <UploadBox
            onUploaded={(r) => {
              setLast(r.upload.name);
              revalidator.revalidate();
            }}
          />
          {last && <p className="mt-2 text-xs text-ink-soft">Added to your history.</p>}
        </Card>
        <Card className="overflow-x-auto">
          <table className="num w-full min-w-[36rem] text-left text-sm">
            <caption className="sr-only">Uploaded ride files</caption>
            <thead className="text-ink-soft">
              <tr>
                <th className="py-1 font-medium">File</th>
                <th className="py-1 font-medium">Uploaded</th>
                <th className="py-1 font-medium">Length</th>
                <th className="py-1 font-medium">Work</th>
                <th className="py-1 font-medium">Avg power</th>
                <th className="py-1 font-medium">Best 20 min</th>
                <th className="py-1 font-medium">Avg HR</th>
              </tr>
            </thead>
            <tbody>
              {loaderData.uploads.map((u) => (
                <tr key={u.id} className="border-t border-line/60">
                  <td className="py-2">
                    <a href={`/athlete/uploads/${u.id}`} className="text-teal underline">
                      {u.name}
                    </a>
                  </td>
                  <td className="py-2">{u.createdAt.slice(0, 10)}</td>
                  <td className="py-2">{Math.round(u.durationS / 60)} min</td>
                  <td className="py-2">{u.workKj === null ? "—" : `${Math.round(u.workKj)} kJ`}</td>
                  <td className="py-2">{u.avgPower === null ? "—" : `${Math.round(u.avgPower)} W`}</td>
                  <td className="py-2">{u.best20 === null ? "—" : `${Math.round(u.best20)} W`}</td>
                  <td className="py-2">{u.avgHr === null ? "—" : `${Math.round(u.avgHr)} bpm`}</td>
                </tr>
              ))}
              {loaderData.uploads.length === 0 && (
                <tr>
                  <td colSpan={7} className="py-4 text-center text-ink-soft">
                    No files yet.
                  </td>
                </tr>
              )}
            </tbody>
          </table>
        </Card>
      </div>
    </>
  );
}
