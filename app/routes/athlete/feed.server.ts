import QRCode from "qrcode";
import type { User } from "~/.server/models";
import { activeFeed, feedUrls, revokeFeed, rotateFeed } from "~/.server/services/feed";
import { alarmSchema, feedLinkSchema, trainingTimesOf, trainingTimesSchema } from "~/lib/feed-forms";
import { accepted, jsonRefusal, parseSubmission, refuse } from "~/lib/forms";

export async function feedPageData(user: User) {
  const active = await activeFeed(user.id);
  const feed = active
    ? {
        ...feedUrls(active.token),
        createdAt: active.createdAt,
        lastUsedAt: active.lastUsedAt,
        qrSvg: await QRCode.toString(feedUrls(active.token).webcal, {
          type: "svg",
          margin: 1,
          color: { dark: "#1B2330", light: "#FFFFFF" },
        }),
      }
    : null;
  return {
    feed,
    alarmMinutes: user.feedAlarmMinutes ?? null,
    forCoach: user.role === "coach",
    trainingTimes: user.trainingTimes ?? Array<string | null>(7).fill(null),
  };
}

export async function feedPageAction(user: User, form: FormData) {
  const intent = form.get("intent");
  if (intent === "rotate" || intent === "revoke") {
    const submission = parseSubmission(form, feedLinkSchema);
    if (submission.status !== "success") return refuse(submission);
    if (submission.value.intent === "rotate") {
      await rotateFeed(user.id);
      return accepted(submission, "A new link is ready. Any earlier link stopped working.");
    }
    await revokeFeed(user.id);
    return accepted(submission, "The link is off. Calendars subscribed to it no longer update.");
  }
  if (intent === "times") {
    const submission = parseSubmission(form, trainingTimesSchema);
    if (submission.status !== "success") return refuse(submission, { form: "Check the times." });
    const times = trainingTimesOf(submission.value);
    await user.update({ trainingTimes: times.some(Boolean) ? times : null });
    return accepted(
      submission,
      times.some(Boolean)
        ? "Saved. Sessions on those days get a start time and a length in your calendar."
        : "Saved. Every session is an all-day event.",
      { reset: false },
    );
  }
  if (intent === "alarm") {
    const submission = parseSubmission(form, alarmSchema);
    if (submission.status !== "success") return refuse(submission);
    const minutes = submission.value.alarmMinutes;
    await user.update({ feedAlarmMinutes: minutes });
    return accepted(
      submission,
      minutes === null ? "No reminders." : `Reminders ${minutes} minutes before timed sessions.`,
      {
        reset: false,
      },
    );
  }
  return jsonRefusal("Unknown request.");
}
