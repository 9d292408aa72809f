import { data } from "react-router";
import { z } from "zod";
import { notFound } from "../http";
import type { User } from "../models";
import { CalendarError, completeSession, sessionDetail } from "./calendar";
import { currentThresholds, thresholdSport, unitFor } from "./thresholds";
import { todayIn } from "~/lib/dates";
import { parseForm } from "~/lib/forms";
import type { Metric } from "~/lib/training";
import { zoneTable } from "~/lib/zone-table";

/** What a session page shows: the session, its steps, and the athlete's zones for the metrics it uses. */
export async function sessionPageData(athlete: User, sessionId: number) {
  const found = await sessionDetail(athlete.id, sessionId);
  if (!found) notFound("No session with this id is on this calendar.");
  const { session, steps } = found;
  const tsport = thresholdSport(session.sport);
  const metrics = [...new Set(steps.map((s) => s.metric).filter((m): m is Metric => m !== null))];
  const current = tsport ? await currentThresholds(athlete.id, todayIn(athlete.timezone)) : [];
  const zones = metrics.flatMap((metric) => {
    const t = current.find((c) => c.sport === tsport && c.metric === metric);
    // Swim pace has no zone table; the session lines already show swim targets.
    return t && tsport ? (zoneTable({ sport: tsport, metric, value: t.value, unit: unitFor(tsport, metric) }) ?? []) : [];
  });
  return {
    session: {
      id: session.id,
      date: session.date,
      timeOfDay: session.timeOfDay,
      name: session.name,
      sport: session.sport,
      status: session.status,
      testProtocol: session.testProtocol,
      notes: session.notes,
      description: session.description,
      plannedDurationS: session.plannedDurationS,
      effortScore: session.effortScore,
      actualMinutes: session.actualMinutes,
      comment: session.comment,
      targetedS: session.targetedS,
      inTargetS: session.inTargetS,
    },
    steps,
    zones,
  };
}

const completeSchema = z
  .object({
    status: z.enum(["done", "skipped", "planned"], { error: "Choose done or skipped." }),
    effortScore: z.coerce.number().int().min(0).max(10).optional(),
    minutes: z.coerce.number().min(1, "Minutes must be at least 1.").max(1440, "Minutes must be at most 1440.").optional(),
    comment: z.string().max(1000).default(""),
  })
  .refine((v) => v.status !== "done" || v.effortScore !== undefined, { message: "Choose how hard it felt (0–10).", path: ["effortScore"] });

export async function completeFromForm(athlete: User, sessionId: number, form: FormData) {
  const parsed = parseForm(completeSchema, form);
  if (!parsed.ok) return data({ ok: false, message: "Check the form.", fieldErrors: parsed.fieldErrors }, { status: 400 });
  try {
    const s = await completeSession(athlete.id, sessionId, { status: parsed.data.status, effortScore: parsed.data.effortScore ?? null, minutes: parsed.data.minutes ?? null, comment: parsed.data.comment });
    return { ok: true, message: s.status === "done" ? "Marked done. Nice work." : s.status === "skipped" ? "Marked skipped." : "Back to planned.", fieldErrors: {} };
  } catch (err) {
    if (err instanceof CalendarError) return data({ ok: false, message: err.message, fieldErrors: {} }, { status: err.status });
    throw err;
  }
}
