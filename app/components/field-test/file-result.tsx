import { TraceChart } from "~/components/trace-chart";
import { UploadBox, type UploadResult } from "~/components/upload-box";
import type { ProtocolKey } from "~/lib/protocols";
import type { TestPreview } from "./proposal";

/** Protocols whose result can come from a ride file instead of typed numbers. */
export const FILE_PROTOCOLS: ProtocolKey[] = ["ramp", "twenty_minute", "eight_minute", "critical_power", "hr_thirty"];
const WINDOWED: ProtocolKey[] = ["twenty_minute", "eight_minute", "hr_thirty"];

const clock = (s: number) => `${Math.floor(s / 60)}:${String(s % 60).padStart(2, "0")}`;

/** The result read from a ride file: the upload, its trace with the detected window (movable), and the pacing. */
export function FileResult(props: {
  protocol: ProtocolKey;
  athleteId?: number;
  upload: UploadResult | null;
  preview: TestPreview | null;
  windowStart: number | null;
  onWindowStart: (s: number) => void;
  onUploaded: (r: UploadResult) => void;
  onReset: () => void;
}) {
  const { protocol, upload, preview, windowStart } = props;
  return (
    <div className="flex flex-col gap-4">
      <UploadBox
        athleteId={props.athleteId}
        onStart={props.onReset}
        onFailed={props.onReset}
        onUploaded={props.onUploaded}
      />
      {upload && (
        <>
          <TraceChart trace={upload.trace} window={preview?.window} />
          {preview?.window && WINDOWED.includes(protocol) && (
            <label className="flex flex-col gap-1 text-sm">
              <span className="font-medium">
                Test window starts at <span className="num">{clock(preview.window.startS)}</span> (shift it if the
                detection is off)
              </span>
              <input
                type="range"
                min={0}
                max={Math.max(0, upload.upload.summary.durationS - preview.window.lengthS)}
                step={10}
                value={windowStart ?? preview.window.startS}
                onChange={(e) => props.onWindowStart(Number(e.target.value))}
                aria-label="Start of the test window in seconds"
              />
            </label>
          )}
          {preview?.pacing && (
            <div className="flex flex-col gap-1 text-sm" data-testid="pacing">
              <p className="num">
                Pacing in thirds: {preview.pacing.means.map((m) => `${Math.round(m)} W`).join(" · ")} —{" "}
                <strong>{preview.pacing.verdict}</strong>
              </p>
              {preview.pacing.advice && <p className="rounded-lg bg-brick/5 p-2 text-ink">{preview.pacing.advice}</p>}
            </div>
          )}
        </>
      )}
    </div>
  );
}
