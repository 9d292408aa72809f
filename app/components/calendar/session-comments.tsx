import { useState } from "react";
import { useFetcher } from "react-router";
import { type FormAnswer, useSchemaForm } from "~/lib/forms";
import { commentSchema } from "~/lib/session-forms";
import { buttonClass } from "~/components/ui/button";
import { Card } from "~/components/ui/card";
import { formatDateTime } from "~/lib/format";

export interface CommentView {
  id: number;
  body: string;
  at: string;
  author: string;
  role: string;
  mine: boolean;
}

/** The thread between athlete and coach on one session; posting goes through the page's own action. */
export function SessionComments({
  comments,
  otherSide,
  timezone,
}: {
  comments: CommentView[];
  otherSide: string;
  timezone: string;
}) {
  const fetcher = useFetcher<FormAnswer>();
  // A message (the browser's check or the server's) stays until the text changes: conform checks again on input.
  const [form, fields] = useSchemaForm(commentSchema, fetcher.data, { id: "session-comment" });
  const [text, setText] = useState("");
  const error = fields.body.errors?.[0] ?? form.errors?.[0];
  // A message the server took empties the box, once per answer.
  const [clearedFor, setClearedFor] = useState<typeof fetcher.data>(undefined);
  if (fetcher.state === "idle" && fetcher.data?.status === "success" && clearedFor !== fetcher.data) {
    setClearedFor(fetcher.data);
    setText("");
  }
  const when = (iso: string) => formatDateTime(iso, timezone);
  return (
    <Card aria-labelledby="comments-heading" className="mt-6">
      <h2 id="comments-heading" className="font-semibold">
        Talk about this session
      </h2>
      <p className="text-sm text-ink-soft">
        Only you and {otherSide} see this; {otherSide} gets an e-mail for each new message.
      </p>
      {comments.length === 0 ? (
        <p className="mt-3 text-sm text-ink-soft">No messages yet.</p>
      ) : (
        <ol className="mt-3 flex flex-col gap-2" aria-label="Messages">
          {comments.map((c) => (
            <li
              key={c.id}
              className={`max-w-[36rem] rounded-lg px-3 py-2 text-sm ${c.mine ? "self-end bg-teal/10" : "bg-paper-deep"}`}
              data-testid="comment"
            >
              <p className="text-xs text-ink-soft">
                {c.mine ? "You" : c.author} · <span className="num">{when(c.at)}</span>
              </p>
              <p className="whitespace-pre-wrap">{c.body}</p>
            </li>
          ))}
        </ol>
      )}
      <fetcher.Form method="post" id={form.id} onSubmit={form.onSubmit} className="mt-3 flex flex-col gap-2" noValidate>
        <input type="hidden" name="intent" value="comment" />
        <label className="flex flex-col gap-1 text-sm">
          <span className="font-medium">Message to {otherSide}</span>
          <textarea
            name={fields.body.name}
            rows={3}
            maxLength={2000}
            value={text}
            onChange={(e) => setText(e.target.value)}
            aria-invalid={error ? true : undefined}
            className={`rounded-lg border px-3 py-2 ${error ? "border-brick" : "border-line"}`}
          />
          {error && <span className="text-brick">{error}</span>}
        </label>
        <button type="submit" className={buttonClass("primary", "self-start")} disabled={fetcher.state !== "idle"}>
          {fetcher.state !== "idle" ? "Sending…" : "Send"}
        </button>
      </fetcher.Form>
    </Card>
  );
}
