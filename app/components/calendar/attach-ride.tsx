import { useFetcher } from "react-router";
import { UploadBox } from "~/components/upload-box";
import { Card } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";

/** Upload the ride file of this session: it is matched to the session and its work and load stored. */
export function AttachRide() {
  const fetcher = useFetcher<{ ok: boolean; message: string }>();
  return (
    <Card className="mt-6 max-w-xl">
      <h2 className="font-semibold">Or attach the ride file</h2>
      <p className="mt-1 text-sm text-ink-soft">
        Work, minutes per band and heart-rate load come from the file. Without an effort score, the ride counts its band
        load from power.
      </p>
      {fetcher.data && (
        <div className="mt-2">
          <FormMessage tone={fetcher.data.ok ? "ok" : "error"}>{fetcher.data.message}</FormMessage>
        </div>
      )}
      <div className="mt-3">
        <UploadBox
          onUploaded={(r) => fetcher.submit({ intent: "attach", uploadId: String(r.upload.id) }, { method: "post" })}
        />
      </div>
    </Card>
  );
}
