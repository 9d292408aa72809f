import { useState } from "react";
import { useFetcher } from "react-router";
import { buttonClass } from "~/components/ui/button";
import { Card } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";

export interface FeedSettingsData {
  feed: { https: string; webcal: string; qrSvg: string; createdAt: string; lastUsedAt: string | null } | null;
  alarmMinutes: number | null;
  trainingTimes: (string | null)[];
  forCoach: boolean;
}

/** The private calendar link with copy, QR code, rotate and revoke; athletes also choose a reminder alarm. */
export function FeedSettings({ data }: { data: FeedSettingsData }) {
  const fetcher = useFetcher<{ ok: boolean; message: string }>();
  const [copied, setCopied] = useState<string | null>(null);
  const copy = async (text: string, which: string) => {
    try {
      await navigator.clipboard.writeText(text);
      setCopied(which);
    } catch {
      setCopied(null);
    }
  };
  const { feed } = data;
  return (
    <div className="grid gap-6 lg:grid-cols-[1fr_18rem]">
      <Card>
        {fetcher.data && (
          <div className="mb-4">
            <FormMessage tone={fetcher.data.ok ? "ok" : "error"}>{fetcher.data.message}</FormMessage>
          </div>
        )}
        {feed ? (
          <div className="flex flex-col gap-4 text-sm">
            <p>
              Subscribe to this private link in your phone's or computer's calendar app. It shows{" "}
              {data.forCoach ? "your athletes' field tests and key sessions" : "your sessions with your own targets"},
              and follows every change — moves, plan edits and new thresholds — when the app refreshes.
            </p>
            {(["webcal", "https"] as const).map((k) => (
              <div key={k} className="flex flex-col gap-1">
                <span className="font-medium">
                  {k === "webcal"
                    ? "Subscribe link (opens your calendar app)"
                    : "Web link (paste into “add calendar from URL”)"}
                </span>
                <div className="flex gap-2">
                  <input
                    readOnly
                    value={feed[k]}
                    aria-label={k === "webcal" ? "Subscribe link" : "Web link"}
                    className="num flex-1 rounded-lg border border-line bg-paper/60 px-3 py-2 text-xs"
                    onFocus={(e) => e.target.select()}
                  />
                  <button type="button" className={buttonClass("secondary", "px-3")} onClick={() => copy(feed[k], k)}>
                    {copied === k ? "Copied" : "Copy"}
                  </button>
                </div>
              </div>
            ))}
            <p className="flex flex-wrap gap-3">
              <a href={feed.webcal} className={buttonClass("primary")}>
                Add to my calendar
              </a>
              <a href={feed.https} className="self-center text-teal underline">
                Open the feed
              </a>
            </p>
            <p className="text-xs text-ink-soft">
              Keep the link to yourself: anyone with it can read this calendar. Made {feed.createdAt.slice(0, 10)}
              {feed.lastUsedAt
                ? `; last fetched ${feed.lastUsedAt.slice(0, 16).replace("T", " ")} UTC`
                : "; not fetched yet"}
              .
            </p>
            <fetcher.Form method="post" className="flex flex-wrap gap-2">
              <button name="intent" value="rotate" className={buttonClass("secondary")}>
                Make a new link
              </button>
              <button name="intent" value="revoke" className={buttonClass("ghost", "text-brick")}>
                Turn the link off
              </button>
            </fetcher.Form>
          </div>
        ) : (
          <fetcher.Form method="post" className="flex flex-col gap-3 text-sm">
            <p>No calendar link is active.</p>
            <button name="intent" value="rotate" className={buttonClass("primary", "self-start")}>
              Make my calendar link
            </button>
          </fetcher.Form>
        )}
        {!data.forCoach && (
          <fetcher.Form method="post" className="mt-6 flex flex-wrap items-end gap-2 border-t border-line pt-4 text-sm">
            <label className="flex flex-col gap-1">
              <span className="font-medium">Reminder before timed sessions</span>
              <select
                name="alarmMinutes"
                defaultValue={data.alarmMinutes ?? ""}
                className="rounded-lg border border-line bg-white px-3 py-2"
              >
                <option value="">None</option>
                <option value="15">15 minutes</option>
                <option value="30">30 minutes</option>
                <option value="60">1 hour</option>
                <option value="120">2 hours</option>
              </select>
            </label>
            <button name="intent" value="alarm" className={buttonClass("secondary")}>
              Save
            </button>
          </fetcher.Form>
        )}
        {!data.forCoach && <TrainingTimes times={data.trainingTimes} />}
      </Card>
      {feed && (
        <Card>
          <h2 className="font-semibold">On your phone</h2>
          <p className="mt-1 text-xs text-ink-soft">Scan with the camera to subscribe.</p>
          <div
            className="mt-3 rounded-lg bg-white p-2"
            role="img"
            aria-label="QR code of the subscribe link"
            dangerouslySetInnerHTML={{ __html: feed.qrSvg }}
          />
        </Card>
      )}
    </div>
  );
}

const WEEKDAYS = ["Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday", "Sunday"];

/** When the athlete usually trains on each weekday; a session's own time on the plan still comes first. */
function TrainingTimes({ times }: { times: (string | null)[] }) {
  const fetcher = useFetcher<{ ok: boolean; message: string; fieldErrors?: Record<string, string> }>();
  const [values, setValues] = useState(() => times.map((t) => t ?? ""));
  const [sent, setSent] = useState<string[] | null>(null);
  const errors = fetcher.data?.fieldErrors ?? {};
  return (
    <fetcher.Form
      method="post"
      className="mt-6 border-t border-line pt-4 text-sm"
      onSubmit={() => setSent(values)}
      noValidate
    >
      <fieldset>
        <legend className="font-medium">Usual training time</legend>
        <p className="mt-1 text-xs text-ink-soft">
          With a time, a session becomes an event that starts then and lasts as long as the session, in your time zone.
          Leave a day empty to keep its sessions all-day.
        </p>
        {fetcher.data && (!fetcher.data.fieldErrors || sent === values) && (
          <p
            role={fetcher.data.ok ? "status" : "alert"}
            className={`mt-2 ${fetcher.data.ok ? "text-teal-dark" : "text-brick"}`}
          >
            {fetcher.data.message}
          </p>
        )}
        <div className="mt-2 grid grid-cols-1 gap-2 sm:grid-cols-2">
          {WEEKDAYS.map((day, i) => {
            // An error belongs to the value that was sent; editing the field clears it.
            const error = sent && sent[i] === values[i] ? errors[`time-${i}`] : undefined;
            return (
              <label key={day} className="flex items-center justify-between gap-2">
                <span>{day}</span>
                <input
                  type="time"
                  name={`time-${i}`}
                  value={values[i]}
                  onChange={(e) => setValues((v) => v.map((x, j) => (j === i ? e.target.value : x)))}
                  aria-invalid={error ? true : undefined}
                  className={`rounded-lg border px-2 py-1 ${error ? "border-brick" : "border-line"}`}
                />
                {error && <span className="text-xs text-brick">{error}</span>}
              </label>
            );
          })}
        </div>
      </fieldset>
      <button name="intent" value="times" className={buttonClass("secondary", "mt-3")}>
        Save training times
      </button>
    </fetcher.Form>
  );
}
