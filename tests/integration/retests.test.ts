import { describe, expect, it } from "vitest";
import { CoachAthlete, FieldTest, OutboundEmail, ScheduledSession } from "~/.server/models";
import { Cron } from "croner";
import { REMINDER_CRON, retestStatus, sendRetestReminders } from "~/.server/services/retests";
import * as roster from "~/routes/coach/roster";
import { addDays, todayIn } from "~/lib/dates";
import { getRequest, makeUser, payloadOf, run, signIn } from "./helpers";

describe("retest due dates and reminders", () => {
  it("takes the next planned test session, else six weeks after the last test; reminds once, three days ahead", async () => {
    const coach = await makeUser({ role: "coach" });
    const athlete = await makeUser({ role: "athlete" });
    await CoachAthlete.create({ coachId: coach.id, athleteId: athlete.id });
    const today = todayIn("UTC");
    expect(await retestStatus(athlete.id, today)).toMatchObject({ due: null });
    await FieldTest.create({
      athleteId: athlete.id,
      protocol: "twenty_minute",
      sport: "bike",
      metric: "power",
      inputs: {},
      derived: {},
      value: 250,
      unit: "W",
      testedOn: addDays(today, -40),
    });
    expect((await retestStatus(athlete.id, today)).due).toBe(addDays(today, 2));
    const before = await OutboundEmail.count({ where: { toAddress: athlete.email, template: "retest-reminder" } });
    await sendRetestReminders();
    await sendRetestReminders();
    expect(await OutboundEmail.count({ where: { toAddress: athlete.email, template: "retest-reminder" } })).toBe(
      before + 1,
    );

    await ScheduledSession.create({
      athleteId: athlete.id,
      date: addDays(today, 10),
      name: "20-minute field test",
      sport: "bike",
      testProtocol: "twenty_minute",
    });
    expect(await retestStatus(athlete.id, today)).toMatchObject({
      due: addDays(today, 10),
      why: expect.stringMatching(/test week/),
    });

    const list = payloadOf(await run(roster.loader, getRequest("/coach", await signIn(coach.email))));
    expect(list.athletes[0].retest).toMatchObject({ due: addDays(today, 10), lastTest: addDays(today, -40) });
  });

  it("schedules the job daily at 07:00 UTC (croner reads the cron line)", () => {
    const rule = new Cron(REMINDER_CRON, { timezone: "UTC", paused: true });
    // The day after a run, and across the night Europe moves its clocks: still 07:00 UTC.
    expect(rule.nextRun(new Date(Date.UTC(2027, 2, 28, 8, 0, 0)))!.toISOString()).toBe("2027-03-29T07:00:00.000Z");
    expect(rule.nextRun(new Date(Date.UTC(2027, 2, 28, 6, 59, 0)))!.toISOString()).toBe("2027-03-28T07:00:00.000Z");
    rule.stop();
  });
});
