import QRCode from "qrcode";
import { data } from "react-router";
import { z } from "zod";
import type { User } from "~/.server/models";
import { activeFeed, feedUrls, revokeFeed, rotateFeed } from "~/.server/services/feed";

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

const alarmSchema = z.union([
  z.literal(""),
  z.coerce
    .number()
    .int()
    .refine((v) => [15, 30, 60, 120].includes(v), "Choose a reminder from the list."),
]);

export async function feedPageAction(user: User, form: FormData) {
  const intent = form.get("intent");
  if (intent === "rotate") {
    await rotateFeed(user.id);
    return { ok: true, message: "A new link is ready. Any earlier link stopped working." };
  }
  if (intent === "revoke") {
    await revokeFeed(user.id);
    return { ok: true, message: "The link is off. Calendars subscribed to it no longer update." };
  }
  if (intent === "times") {
    const times: (string | null)[] = [];
    const fieldErrors: Record<string, string> = {};
    for (let d = 0; d < 7; d++) {
      const v = String(form.get(`time-${d}`) ?? "").trim();
      if (v === "") times.push(null);
      else if (/^([01]\d|2[0-3]):[0-5]\d$/.test(v)) times.push(v);
      else fieldErrors[`time-${d}`] = "Use a time like 06:30, or leave it empty for all day.";
    }
    if (Object.keys(fieldErrors).length)
      return data({ ok: false, message: "Check the times.", fieldErrors }, { status: 400 });
    await user.update({ trainingTimes: times.some(Boolean) ? times : null });
    return {
      ok: true,
      message: times.some(Boolean)
        ? "Saved. Sessions on those days get a start time and a length in your calendar."
        : "Saved. Every session is an all-day event.",
    };
  }
  if (intent === "alarm") {
    const parsed = alarmSchema.safeParse(form.get("alarmMinutes") ?? "");
    if (!parsed.success) return data({ ok: false, message: parsed.error.issues[0].message }, { status: 400 });
    await user.update({ feedAlarmMinutes: parsed.data === "" ? null : parsed.data });
    return {
      ok: true,
      message: parsed.data === "" ? "No reminders." : `Reminders ${parsed.data} minutes before timed sessions.`,
    };
  }
  return data({ ok: false, message: "Unknown request." }, { status: 400 });
}
