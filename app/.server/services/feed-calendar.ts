/** The iCalendar body of a person's feed: their sessions (a coach's: their athletes') as events. */
import { TZDate } from "@date-fns/tz";
import ical, { ICalAlarmType, ICalCalendarMethod, ICalEventStatus } from "ical-generator";
import { QueryTypes } from "sequelize";
import { tzlib_get_ical_block } from "timezones-ical-library";
import { db } from "../db";
import { env } from "../env";
import { CoachAthlete, ScheduledSession, User } from "../models";
import { addDays, daysAgo, todayIn, weekday } from "~/lib/dates";
import { zonedInstant } from "~/lib/zone-time";
import { PROTOCOLS, READINESS, type ProtocolKey } from "~/lib/protocols";
import { blockBands, blockLines, type StepView } from "~/lib/schedule-text";
import type { BandSet, BandSetKey } from "~/lib/training";
import { bandSetsFor } from "./bands";
import { pacingPlansFor, pacingText } from "./pacing";

export const FEED_WEEKS_BACK = 8;
export const FEED_DAYS_AHEAD = 365;
/** A removed session stays in the feed this long as CANCELLED, so subscribed calendars drop it. */
export const CANCELLED_GRACE_DAYS = 14;
/** What the feed asks calendar apps to wait between refreshes (REFRESH-INTERVAL / X-PUBLISHED-TTL). */
export const REFRESH_SECONDS = 3600;
/** Planned effort load from which a session counts as a key session in a coach's feed (common practice). */
export const KEY_SESSION_LOAD = 300;

/** ical-generator escapes commas and semicolons but leaves line breaks in names as they are; names are one line. */
const oneLine = (s: string) => s.replace(/[\r\n]+/g, " ").trim();

export const parseSqlDate = (s: string) => new Date(s.replace(" +00:00", "Z").replace(" ", "T"));

/** The session columns an event is made of (plus what pacingPlansFor reads), in model attribute names. */
type FeedSession = Pick<
  ScheduledSession,
  | "id"
  | "athleteId"
  | "date"
  | "timeOfDay"
  | "name"
  | "sport"
  | "status"
  | "testProtocol"
  | "pacingSplit"
  | "notes"
  | "description"
  | "effortScore"
  | "actualMinutes"
  | "feedSequence"
  | "plannedDurationS"
> & { updatedAt: Date | string };

async function sessionsFor(
  athleteIds: number[],
  from: string,
  to: string,
  opts: { keyOnly?: boolean } = {},
): Promise<FeedSession[]> {
  if (athleteIds.length === 0) return [];
  const graceFrom = daysAgo(CANCELLED_GRACE_DAYS);
  // Raw and only the columns used: a full rebuild reads hundreds of sessions, and building model rows of every
  // column was a large share of it.
  return db().query<FeedSession>(
    `SELECT id, athlete_id AS "athleteId", date, time_of_day AS "timeOfDay", name, sport, status, test_protocol AS "testProtocol", pacing_split AS "pacingSplit",
            notes, description, effort_score AS "effortScore", actual_minutes AS "actualMinutes", feed_sequence AS "feedSequence", planned_duration_s AS "plannedDurationS", updated_at AS "updatedAt"
     FROM scheduled_sessions
     WHERE athlete_id IN (:ids) AND date BETWEEN :from AND :to AND (status <> 'cancelled' OR cancelled_at >= :graceFrom)
       ${opts.keyOnly ? "AND (test_protocol IS NOT NULL OR planned_load >= :keyLoad)" : ""}
     ORDER BY date, position, id`,
    { replacements: { ids: athleteIds, from, to, graceFrom, keyLoad: KEY_SESSION_LOAD }, type: QueryTypes.SELECT },
  );
}

async function stepsFor(sessionIds: number[]) {
  const map = new Map<number, StepView[]>();
  if (!sessionIds.length) return map;
  const rows = await db().query<StepView & { scheduledSessionId: number }>(
    `SELECT scheduled_session_id AS "scheduledSessionId", position, block_index AS "blockIndex", kind, part, rep, rep_count AS "repCount", duration_s AS "durationS",
            metric, low_pct AS "lowPct", high_pct AS "highPct", ramp, low_abs AS "lowAbs", high_abs AS "highAbs", unit, cue
     FROM scheduled_blocks WHERE scheduled_session_id IN (:ids) ORDER BY scheduled_session_id, position`,
    { replacements: { ids: sessionIds }, type: QueryTypes.SELECT },
  );
  for (const r of rows) {
    const list = map.get(r.scheduledSessionId) ?? [];
    list.push({ ...r, ramp: Boolean(r.ramp) });
    map.set(r.scheduledSessionId, list);
  }
  return map;
}

/** A title a phone calendar can show whole; the targets and everything else are in the description. */
const TITLE_MAX = 48;
const shortTitle = (s: string) => (s.length > TITLE_MAX ? `${s.slice(0, TITLE_MAX - 1).trimEnd()}…` : s);
const STATE_PREFIX: Record<string, string> = { done: "✓ ", skipped: "Skipped: " };

function stateLine(s: { status: string; effortScore: number | null; actualMinutes: number | null }) {
  if (s.status === "done")
    return `Done${s.actualMinutes ? `: ${s.actualMinutes} min` : ""}${s.effortScore !== null ? `, effort ${s.effortScore} of 10` : ""}.`;
  if (s.status === "skipped") return "Skipped.";
  return null;
}

/** RFC 5545 duration of whole minutes ("PT75M"). */
const durationText = (seconds: number) => `PT${Math.max(1, Math.round(seconds / 60))}M`;

/**
 * The feed states a timed event's length as DURATION (which stays right whatever a calendar app does with the zone
 * of an end time) where ical-generator would write DTEND, right after DTSTART. Such events are given no end, so
 * no end time is converted to the zone only to be dropped again, and the DURATION line goes in after DTSTART.
 * Lines here are short, so no folded line is touched.
 */
function endsAsDurations(ics: string, durations: Map<string, string>) {
  if (durations.size === 0) return ics;
  return ics
    .split("BEGIN:VEVENT\r\n")
    .map((chunk, i) => {
      if (i === 0) return chunk;
      const uid = /(?:^|\r\n)UID:([^\r\n]+)/.exec(chunk)?.[1];
      const d = uid ? durations.get(uid) : undefined;
      return d ? chunk.replace(/(^|\r\n)(DTSTART[^\r\n]*\r\n)/, `$1$2DURATION:${d}\r\n`) : chunk;
    })
    .join("BEGIN:VEVENT\r\n");
}

/** Each block's line with its % of threshold and its intensity band, in the athlete's (their coach's) band set. */
function description(
  s: {
    name: string;
    sport: string;
    testProtocol: string | null;
    notes: string;
    description?: string;
    state?: string | null;
  },
  steps: StepView[],
  link: string,
  sets: Record<BandSetKey, BandSet>,
  pacing: string | null = null,
) {
  const bands = new Map(blockBands(steps, s.sport, sets).map((b) => [b.blockIndex, b.name]));
  const lines = blockLines(steps).map((l) => {
    const first = steps.find((x) => x.blockIndex === l.blockIndex && x.part !== "recovery");
    const band = bands.get(l.blockIndex);
    const pct =
      first?.lowPct != null
        ? ` (${first.lowPct}${first.highPct != null && first.highPct !== first.lowPct ? `–${first.highPct}` : ""} % of threshold${band ? `, ${band} band` : ""})`
        : "";
    return `• ${l.text}${pct}${l.needsTest ? " — needs a field test" : ""}`;
  });
  const parts = [s.state, s.name, s.description, lines.join("\n")].filter((x): x is string => Boolean(x));
  if (s.testProtocol) {
    const p = PROTOCOLS[s.testProtocol as ProtocolKey];
    parts.push(
      `FIELD TEST: ${p?.instructions ?? ""}\nAnswer the readiness questions in Pacewright first. Stop at once at ${READINESS.stopSigns.join(", ")}. ${READINESS.stopAdvice}`,
    );
    if (pacing) parts.push(pacing);
  }
  if (s.notes) parts.push(`Note from the coach: ${s.notes}`);
  parts.push(`Open in Pacewright: ${link}`);
  return parts.join("\n\n");
}

/**
 * Builds the iCalendar text for a feed token's owner: an athlete's own sessions, or a coach's athletes' field tests
 * and key sessions. Timed sessions are written in the athlete's time zone (with its VTIMEZONE), untimed ones as
 * all-day DATE events; UIDs are stable per session and SEQUENCE is the session's feed sequence.
 */
export async function buildFeed(owner: User, now = new Date()) {
  const isCoach = owner.role === "coach";
  const athletes = isCoach
    ? await User.findAll({
        where: { id: (await CoachAthlete.findAll({ where: { coachId: owner.id } })).map((l) => l.athleteId) },
      })
    : [owner];
  const byId = new Map(athletes.map((a) => [a.id, a]));
  const today = todayIn(owner.timezone, now);
  const sessions = await sessionsFor(
    athletes.map((a) => a.id),
    addDays(today, -FEED_WEEKS_BACK * 7),
    addDays(today, FEED_DAYS_AHEAD),
    { keyOnly: isCoach },
  );
  const steps = await stepsFor(sessions.map((s) => s.id));
  const bandSets = new Map(await Promise.all(athletes.map(async (a) => [a.id, await bandSetsFor(a)] as const)));
  const pacing = await pacingPlansFor(sessions);
  const cal = ical({
    name: oneLine(isCoach ? `Pacewright · ${owner.name}'s athletes` : `Pacewright · ${owner.name}`),
    description: isCoach ? "Field tests and key sessions of your athletes" : "Your training plan with your own targets",
    prodId: { company: "Pacewright", product: "Pacewright", language: "EN" },
    method: ICalCalendarMethod.PUBLISH,
    ttl: REFRESH_SECONDS,
    url: `${env().appUrl}${isCoach ? "/coach" : "/athlete/calendar"}`,
  });
  let lastModified = new Date(0);
  const durations = new Map<string, string>();
  for (const s of sessions) {
    const athlete = byId.get(s.athleteId)!;
    const mySteps = steps.get(s.id) ?? [];
    const modified = s.updatedAt instanceof Date ? s.updatedAt : parseSqlDate(String(s.updatedAt));
    if (modified > lastModified) lastModified = modified;
    const link = `${env().appUrl}${isCoach ? `/coach/athletes/${athlete.id}/sessions/${s.id}` : `/athlete/sessions/${s.id}`}`;
    const summary = oneLine(
      `${STATE_PREFIX[s.status] ?? ""}${isCoach ? `${athlete.name}: ` : ""}${shortTitle(s.name)}`,
    );
    const [y, m, d] = s.date.split("-").map(Number);
    const base = {
      id: `session-${s.id}@pacewright`,
      summary,
      description: description(
        {
          name: s.name,
          sport: s.sport,
          testProtocol: s.testProtocol,
          notes: s.notes,
          description: s.description,
          state: stateLine(s),
        },
        mySteps,
        link,
        bandSets.get(athlete.id)!,
        pacingText(pacing.get(s.id)),
      ),
      sequence: s.feedSequence,
      lastModified: modified,
      stamp: modified,
      url: link,
      status: s.status === "cancelled" ? ICalEventStatus.CANCELLED : ICalEventStatus.CONFIRMED,
    };
    // The session's own time wins; otherwise the athlete's usual time for that weekday; otherwise all-day.
    const time = s.timeOfDay ?? athlete.trainingTimes?.[weekday(s.date)] ?? null;
    if (time) {
      const [hh, mm] = time.split(":").map(Number);
      // Built from its instant: TZDate's own wall-clock constructor looks offsets up several times per event.
      const start = new TZDate(zonedInstant(athlete.timezone, y, m, d, hh, mm), athlete.timezone);
      durations.set(base.id, durationText(Math.max(60, s.plannedDurationS)));
      const event = cal.createEvent({ ...base, start, timezone: athlete.timezone });
      if (!isCoach && owner.feedAlarmMinutes)
        event.createAlarm({ type: ICalAlarmType.display, trigger: owner.feedAlarmMinutes * 60, description: s.name });
    } else {
      cal.createEvent({ ...base, start: s.date, allDay: true });
    }
  }
  return {
    body: withTimezones(endsAsDurations(cal.toString(), durations), [...new Set(athletes.map((a) => a.timezone))]),
    lastModified: lastModified.getTime() > 0 ? lastModified : now,
    count: sessions.length,
  };
}

/**
 * Adds a VTIMEZONE for each zone the events use. Done here rather than through ical-generator's calendar time zone,
 * which would also write DTSTAMP and LAST-MODIFIED as local times, where RFC 5545 wants UTC.
 */
function withTimezones(ics: string, zones: string[]) {
  const blocks = zones
    .filter((z) => z !== "UTC")
    .map((z) => (tzlib_get_ical_block(z) as string[])[0])
    .filter((b): b is string => typeof b === "string" && b.startsWith("BEGIN:VTIMEZONE"))
    .map((b) => b.replace(/\r?\n/g, "\r\n").trim() + "\r\n")
    .join("");
  if (!blocks) return ics;
  const at = ics.indexOf("BEGIN:VEVENT\r\n");
  const cut = at === -1 ? ics.indexOf("END:VCALENDAR") : at;
  return ics.slice(0, cut) + blocks + ics.slice(cut);
}
