import { describe, expect, it } from "vitest";
import { CoachAthlete, ScheduledSession } from "~/.server/models";
import * as athleteCalendar from "~/routes/athlete/calendar";
import * as coachCalendar from "~/routes/coach/athlete-calendar";
import { addDays, mondayOf, todayIn } from "~/lib/dates";
import { getRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

describe("the calendar page's weeks live in the URL", () => {
  it("?from= picks the two weeks (snapped to their Monday); without it or with nonsense, this week", async () => {
    const athlete = await makeUser({ role: "athlete" });
    const cookie = await signIn(athlete.email);
    const today = todayIn(athlete.timezone);
    await ScheduledSession.create({
      athleteId: athlete.id,
      date: "2027-03-10",
      name: "Wednesday ride",
      sport: "bike",
      plannedDurationS: 3600,
      plannedLoad: 200,
    });
    await ScheduledSession.create({
      athleteId: athlete.id,
      date: "2027-03-31",
      name: "Too late",
      sport: "bike",
      plannedDurationS: 3600,
      plannedLoad: 200,
    });

    const later = payloadOf(await run(athleteCalendar.loader, getRequest("/athlete/calendar?from=2027-03-11", cookie)));
    expect(later.from).toBe("2027-03-08");
    expect(later.sessions.map((s: { name: string }) => s.name)).toEqual(["Wednesday ride"]);

    for (const q of ["", "?from=2027-02-30", "?from=soon"]) {
      const page = payloadOf(await run(athleteCalendar.loader, getRequest(`/athlete/calendar${q}`, cookie)));
      expect(page.from).toBe(mondayOf(today));
    }
  });

  it("a coach pages through their athlete's weeks the same way; another coach gets 404", async () => {
    const coach = await makeUser({ role: "coach" });
    const athlete = await makeUser({ role: "athlete" });
    await CoachAthlete.create({ coachId: coach.id, athleteId: athlete.id });
    const today = todayIn(athlete.timezone);
    const ask = addDays(mondayOf(today), 14);
    const page = payloadOf(
      await run(
        coachCalendar.loader,
        getRequest(`/coach/athletes/${athlete.id}/calendar?from=${ask}`, await signIn(coach.email)),
        { athleteId: String(athlete.id) },
      ),
    );
    expect(page.from).toBe(ask);
    const other = await makeUser({ role: "coach" });
    expect(
      statusOf(
        await run(
          coachCalendar.loader,
          getRequest(`/coach/athletes/${athlete.id}/calendar?from=${ask}`, await signIn(other.email)),
          { athleteId: String(athlete.id) },
        ).catch((e) => e),
      ),
    ).toBe(404);
  });
});
