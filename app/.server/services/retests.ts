import { Cron } from "croner";
import { Op, QueryTypes } from "sequelize";
import { db, sqlDate, writeTransaction } from "../db";
import { env } from "../env";
import { queueEmail } from "../mail";
import { CoachAthlete, FieldTest, ScheduledSession, User } from "../models";
import { addDays, todayIn } from "~/lib/dates";

/** Without a test week on the calendar, a retest falls due this many weeks after the last test (common practice: 4–8). */
export const RETEST_WEEKS = 6;
export const REMIND_DAYS_BEFORE = 3;

export interface RetestStatus {
  lastTest: string | null;
  due: string | null;
  why: string;
}

/** When an athlete's next field test is due: the next planned test session, else six weeks after the last test. */
export async function retestStatus(athleteId: number, today: string): Promise<RetestStatus> {
  const last = await FieldTest.findOne({ where: { athleteId, status: "active" }, order: [["testedOn", "DESC"]] });
  const planned = await ScheduledSession.findOne({
    where: { athleteId, status: "planned", testProtocol: { [Op.ne]: null }, date: { [Op.gte]: today } },
    order: [["date", "ASC"]],
  });
  return retestFrom(last?.testedOn ?? null, planned);
}

/** The rule itself, for rows already read (the roster reads them for every athlete at once). */
export function retestFrom(
  lastTest: string | null,
  planned: { date: string; name: string } | null | undefined,
): RetestStatus {
  if (planned) return { lastTest, due: planned.date, why: `a test week in the plan: ${planned.name}` };
  if (lastTest)
    return { lastTest, due: addDays(lastTest, RETEST_WEEKS * 7), why: `${RETEST_WEEKS} weeks after the last test` };
  return { lastTest: null, due: null, why: "no test yet" };
}

/**
 * Queues a reminder for every athlete whose retest is due within the next few days and who has not been reminded
 * for that date. Safe to run any number of times.
 */
export async function sendRetestReminders(now = new Date()) {
  const athletes = await User.findAll({ where: { role: "athlete" } });
  let sent = 0;
  for (const a of athletes) {
    const today = todayIn(a.timezone, now);
    const status = await retestStatus(a.id, today);
    if (!status.due || status.due < today || status.due > addDays(today, REMIND_DAYS_BEFORE)) continue;
    await writeTransaction(async (transaction) => {
      const [, inserted] = await db().query(
        "INSERT INTO retest_reminders (athlete_id, due_date, created_at) VALUES (?, ?, ?) ON CONFLICT (athlete_id, due_date) DO NOTHING",
        { replacements: [a.id, status.due, sqlDate(now)], type: QueryTypes.INSERT, transaction },
      );
      if (!inserted) return;
      await queueEmail(
        {
          to: a.email,
          template: "retest-reminder",
          vars: { name: a.name, dueDate: status.due!, why: status.why, link: `${env().appUrl}/athlete/tests/new` },
        },
        transaction,
      );
      sent++;
    });
  }
  return sent;
}

/** The reminder job's schedule: every day at 07:00 UTC (cron syntax, read by croner). */
export const REMINDER_CRON = "0 7 * * *";

declare global {
  var __pacewrightReminders: Cron | undefined;
}

const runReminders = async () => {
  await sendRetestReminders().catch((err) => console.error("[reminders]", err));
};

/**
 * Runs the reminder job on REMINDER_CRON, and once at start in case a run was missed while no instance was up.
 * Several instances may all fire: each reminder is claimed once per athlete and day in the database.
 */
export function startRetestReminders() {
  if (globalThis.__pacewrightReminders) return;
  globalThis.__pacewrightReminders = new Cron(
    REMINDER_CRON,
    { timezone: "UTC", protect: true, unref: true, name: "retest-reminders" },
    runReminders,
  );
  void runReminders();
}

export function stopRetestReminders() {
  globalThis.__pacewrightReminders?.stop();
  globalThis.__pacewrightReminders = undefined;
}

export async function coachIdsOf(athleteId: number) {
  return (await CoachAthlete.findAll({ where: { athleteId } })).map((l) => l.coachId);
}
