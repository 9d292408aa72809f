import type { UploadSummary } from "~/.server/services/uploads";
import { useRef, useState } from "react";

export interface UploadResult {
  upload: { id: number; name: string; format: string; size: number; createdAt: string; summary: UploadSummary };
  trace: { t: number; power: number | null; hr: number | null }[];
}

/**
 * Sends one ride file to /api/uploads with a visible progress bar (XHR reports upload progress; fetch does not).
 * The server enforces the 25 MB limit and the allowed types; its message is shown as it is.
 */
export function UploadBox({
  athleteId,
  onUploaded,
  onStart,
  onFailed,
  label = "Ride file (CSV, GPX or FIT, up to 25 MB)",
}: {
  athleteId?: number;
  onUploaded: (r: UploadResult) => void;
  /** Called as a new file starts uploading, so a form can drop whatever it derived from the previous file. */
  onStart?: () => void;
  onFailed?: (message: string) => void;
  label?: string;
}) {
  const [progress, setProgress] = useState<number | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [done, setDone] = useState<string | null>(null);
  const input = useRef<HTMLInputElement>(null);
  const send = (file: File) => {
    setError(null);
    setDone(null);
    setProgress(0);
    onStart?.();
    const body = new FormData();
    body.append("file", file);
    const xhr = new XMLHttpRequest();
    xhr.open("POST", `/api/uploads${athleteId ? `?athleteId=${athleteId}` : ""}`);
    xhr.upload.onprogress = (e) => e.lengthComputable && setProgress(Math.round((e.loaded / e.total) * 100));
    xhr.onload = () => {
      setProgress(null);
      let reply: (Partial<UploadResult> & { error?: string }) | null = null;
      try {
        reply = JSON.parse(xhr.responseText);
      } catch {
        /* not JSON */
      }
      if (xhr.status === 201 && reply?.upload) {
        setDone(
          `${reply.upload.name} read: ${Math.round(reply.upload.summary.durationS / 60)} min, ${reply.upload.summary.channels.join(", ")}.`,
        );
        onUploaded(reply as UploadResult);
      } else {
        const message =
          reply?.error ??
          (xhr.status === 413 ? "That file is larger than 25 MB." : `The upload failed (${xhr.status}).`);
        setError(message);
        onFailed?.(message);
      }
      if (input.current) input.current.value = "";
    };
    xhr.onerror = () => {
      setProgress(null);
      setError("The upload did not reach the server; check the connection and try again.");
      onFailed?.("The upload did not reach the server.");
    };
    xhr.send(body);
  };
  return (
    <div className="flex flex-col gap-2 text-sm">
      <label className="font-medium" htmlFor="ride-file">
        {label}
      </label>
      <input
        id="ride-file"
        ref={input}
        type="file"
        accept=".csv,.gpx,.fit"
        onChange={(e) => e.target.files?.[0] && send(e.target.files[0])}
        className="text-sm"
      />
      {progress !== null && (
        <div className="flex items-center gap-2">
          <progress value={progress} max={100} className="h-2 w-full accent-teal" aria-label="Upload progress" />
          <span className="num w-10 text-right">{progress} %</span>
        </div>
      )}
      {error && (
        <p role="alert" className="text-brick">
          {error}
        </p>
      )}
      {done && (
        <p role="status" className="text-teal-dark">
          {done}
        </p>
      )}
    </div>
  );
}
