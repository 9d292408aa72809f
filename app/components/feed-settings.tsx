import { useState } from "react";
import { useFetcher } from "react-router";
import { buttonClass } from "~/components/ui/button";
import { Card } from "~/components/ui/card";
import { FormMessage } from "~/components/ui/field";
import { alarmSchema, trainingTimesSchema } from "~/lib/feed-forms";
import { fieldProps, firstMessage, type FormAnswer, messageOf, useSchemaForm } from "~/lib/forms";

export interface FeedSettingsData {
  feed: { https: string; webcal: string; qrSvg: string; createdAt: string; lastUsedAt: string | null } | null;
  alarmMinutes: number | null;
  trainingTimes: (string | null)[];
  forCoach: boolean;
}

/** The private calendar link with copy, QR code, rotate and revoke; athletes also choose a reminder alarm. */
export function FeedSettings({ data }: { data: FeedSettingsData }) {
  const fetcher = useFetcher<FormAnswer>();
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
        <ReplyNote reply={fetcher.data} />
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
        {!data.forCoach && <AlarmForm minutes={data.alarmMinutes} />}
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

/** What a reply says: the saved note, or the refusal (whichever field it names). */
function ReplyNote({ reply }: { reply: FormAnswer | undefined }) {
  const saved = reply?.message;
  const refused = firstMessage(reply);
  if (!refused && !saved) return null;
  return (
    <div className="mb-4">
      <FormMessage tone={refused ? "error" : "ok"}>{refused ?? saved}</FormMessage>
    </div>
  );
}

/** The reminder alarm on timed sessions; its answer stands beside it. */
function AlarmForm({ minutes }: { minutes: number | null }) {
  const fetcher = useFetcher<FormAnswer>();
  const [form, fields] = useSchemaForm(alarmSchema, fetcher.data, { id: "feed-alarm" });
  const error = fieldProps(fields.alarmMinutes).error;
  const saved = fetcher.data?.message;
  return (
    <fetcher.Form
      method="post"
      id={form.id}
      onSubmit={form.onSubmit}
      noValidate
      className="mt-6 flex flex-wrap items-end gap-2 border-t border-line pt-4 text-sm"
    >
      <label className="flex flex-col gap-1">
        <span className="font-medium">Reminder before timed sessions</span>
        <select
          name={fields.alarmMinutes.name}
          defaultValue={minutes ?? ""}
          aria-invalid={error ? true : undefined}
          className={`rounded-lg border bg-white px-3 py-2 ${error ? "border-brick" : "border-line"}`}
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
      {(error ?? saved) && (
        <span role={error ? "alert" : "status"} className={`self-center ${error ? "text-brick" : "text-teal-dark"}`}>
          {error ?? saved}
        </span>
      )}
    </fetcher.Form>
  );
}

const WEEKDAYS = ["Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday", "Sunday"];

/** When the athlete usually trains on each weekday; a session's own time on the plan still comes first. */
function TrainingTimes({ times }: { times: (string | null)[] }) {
  const fetcher = useFetcher<FormAnswer>();
  const [form, fields] = useSchemaForm(trainingTimesSchema, fetcher.data, { id: "training-times" });
  const saved = fetcher.data?.message;
  const refused = messageOf(fetcher.data);
  return (
    <fetcher.Form
      method="post"
      id={form.id}
      onSubmit={form.onSubmit}
      className="mt-6 border-t border-line pt-4 text-sm"
      noValidate
    >
      <fieldset>
        <legend className="font-medium">Usual training time</legend>
        <p className="mt-1 text-xs text-ink-soft">
          With a time, a session becomes an event that starts then and lasts as long as the session, in your time zone.
          Leave a day empty to keep its sessions all-day.
        </p>
        {(refused ?? saved) && (
          <p role={refused ? "alert" : "status"} className={`mt-2 ${refused ? "text-brick" : "text-teal-dark"}`}>
            {refused ?? saved}
          </p>
        )}
        <div className="mt-2 grid grid-cols-1 gap-2 sm:grid-cols-2">
          {WEEKDAYS.map((day, i) => {
            // conform checks the field again as it is corrected, so a fixed time loses its message at once.
            const error = fieldProps(fields[`time-${i}` as keyof typeof fields]).error;
            return (
              <label key={day} className="flex items-center justify-between gap-2">
                <span>{day}</span>
                <input
                  type="time"
                  name={`time-${i}`}
                  defaultValue={times[i] ?? ""}
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
