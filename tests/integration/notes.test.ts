import { describe, expect, it } from "vitest";
import {
  CoachAthlete,
  OutboundEmail,
  PlanItem,
  PlanWeek,
  ScheduledSession,
  ShelfSession,
  ShelfBlock,
  SessionComment,
  Threshold,
} from "~/.server/models";
import { applyBoardOp } from "~/.server/services/board";
import { assignPlan } from "~/.server/services/materialize";
import { createPlan } from "~/.server/services/plans";
import * as athleteSession from "~/routes/athlete/session";
import * as coachSession from "~/routes/coach/athlete-session";
import { fieldErrorsOf, formRequest, getRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

async function scenario() {
  const coach = await makeUser({ role: "coach", name: "Coach Ines" });
  const athlete = await makeUser({ role: "athlete", name: "Rider Ola" });
  await CoachAthlete.create({ coachId: coach.id, athleteId: athlete.id });
  await Threshold.create({
    athleteId: athlete.id,
    sport: "bike",
    metric: "power",
    value: 240,
    unit: "W",
    effectiveFrom: "2026-01-01",
    source: "manual",
  });
  const s = await ShelfSession.create({
    ownerId: coach.id,
    name: "Long steady",
    sport: "bike",
    description: "Flat route, keep it conversational.",
  });
  await ShelfBlock.create({
    sessionId: s.id,
    position: 0,
    kind: "steady",
    spec: { kind: "steady", durationS: 3600, target: { metric: "power", lowPct: 60, highPct: 70 } },
  });
  const plan = await createPlan(coach.id, {
    name: "Notes plan",
    sport: "bike",
    description: "",
    alignment: "start",
    date: "2027-06-07",
    weeks: 4,
    weeklyHours: 6,
    pattern: "3:1",
    testEveryWeeks: 6,
  });
  await PlanItem.destroy({ where: { planId: plan.id } });
  const [w1] = await PlanWeek.findAll({ where: { planId: plan.id }, order: [["idx", "ASC"]] });
  const r = await applyBoardOp(coach.id, plan.id, { op: "copy", sessionId: s.id, toWeek: w1.id, toDay: 2, toIndex: 0 });
  const itemId = r.items[0].id;
  await applyBoardOp(coach.id, plan.id, { op: "note", itemId, notes: "  Bring two bottles.  " });
  await assignPlan(coach, plan.id, [athlete.id], { mode: "start", date: "2027-06-07" });
  const scheduled = (await ScheduledSession.findOne({ where: { athleteId: athlete.id, name: "Long steady" } }))!;
  return { coach, athlete, itemId, scheduled, planId: plan.id };
}

describe("notes and comments between coach and athlete", () => {
  it("the session's description and the coach's note reach the athlete's session page; the coach's view names the athlete", async () => {
    const { coach, athlete, scheduled, itemId } = await scenario();
    expect((await PlanItem.findByPk(itemId))!.notes).toBe("Bring two bottles.");
    expect(scheduled.description).toBe("Flat route, keep it conversational.");
    expect(scheduled.notes).toBe("Bring two bottles.");
    const page = payloadOf(
      await run(athleteSession.loader, getRequest(`/athlete/sessions/${scheduled.id}`, await signIn(athlete.email)), {
        id: String(scheduled.id),
      }),
    );
    expect(page.session).toMatchObject({
      description: "Flat route, keep it conversational.",
      notes: "Bring two bottles.",
    });
    expect(page.coachNames).toEqual(["Coach Ines"]);
    const coachPage = payloadOf(
      await run(coachSession.loader, getRequest("/", await signIn(coach.email)), {
        athleteId: String(athlete.id),
        sessionId: String(scheduled.id),
      }),
    );
    expect(coachPage.athleteName).toBe("Rider Ola");
    expect(coachPage.session.notes).toBe("Bring two bottles.");
  });

  it("athlete and coach write in the session's thread; each message queues an e-mail to the other side", async () => {
    const { coach, athlete, scheduled } = await scenario();
    const aCookie = await signIn(athlete.email);
    const cCookie = await signIn(coach.email);
    const res = await run(
      athleteSession.action,
      formRequest(
        `/athlete/sessions/${scheduled.id}`,
        { intent: "comment", body: "Legs felt heavy in the second hour." },
        { cookie: aCookie },
      ),
      { id: String(scheduled.id) },
    );
    expect(payloadOf(res)).toMatchObject({ status: "success", message: "Sent." });
    const toCoach = await OutboundEmail.findAll({ where: { toAddress: coach.email, template: "session-comment" } });
    expect(toCoach).toHaveLength(1);
    expect(toCoach[0].subject).toBe(`Rider Ola wrote about Long steady on ${scheduled.date}`);
    expect(toCoach[0].textBody).toContain("Legs felt heavy in the second hour.");
    expect(toCoach[0].textBody).toContain(`/coach/athletes/${athlete.id}/sessions/${scheduled.id}`);

    const reply = await run(
      coachSession.action,
      formRequest("/", { intent: "comment", body: "Fine: eat earlier next time." }, { cookie: cCookie }),
      { athleteId: String(athlete.id), sessionId: String(scheduled.id) },
    );
    expect(payloadOf(reply)).toMatchObject({ status: "success", message: "Sent." });
    expect(await OutboundEmail.count({ where: { toAddress: athlete.email, template: "session-comment" } })).toBe(1);

    const thread = payloadOf(
      await run(athleteSession.loader, getRequest("/", aCookie), { id: String(scheduled.id) }),
    ).comments;
    expect(thread.map((c: { body: string; mine: boolean; author: string }) => [c.author, c.mine, c.body])).toEqual([
      ["Rider Ola", true, "Legs felt heavy in the second hour."],
      ["Coach Ines", false, "Fine: eat earlier next time."],
    ]);
    // An empty message is refused with a message and writes nothing.
    const empty = await run(
      athleteSession.action,
      formRequest("/", { intent: "comment", body: "   " }, { cookie: aCookie }),
      { id: String(scheduled.id) },
    );
    expect(statusOf(empty)).toBe(400);
    expect(fieldErrorsOf(empty)).toEqual({ body: "Write something first." });
    expect(await SessionComment.count({ where: { scheduledSessionId: scheduled.id } })).toBe(2);
  });

  it("nobody outside the pair reads or writes the thread, nor sets notes on another coach's plan", async () => {
    const { athlete, scheduled, planId, itemId } = await scenario();
    const stranger = await makeUser({ role: "athlete" });
    const otherCoach = await makeUser({ role: "coach" });
    const sCookie = await signIn(stranger.email);
    const oCookie = await signIn(otherCoach.email);
    const post = await run(
      athleteSession.action,
      formRequest("/", { intent: "comment", body: "hello" }, { cookie: sCookie }),
      { id: String(scheduled.id) },
    );
    expect(statusOf(post)).toBe(404);
    expect(statusOf(await run(athleteSession.loader, getRequest("/", sCookie), { id: String(scheduled.id) }))).toBe(
      404,
    );
    const coachPost = await run(
      coachSession.action,
      formRequest("/", { intent: "comment", body: "hello" }, { cookie: oCookie }),
      { athleteId: String(athlete.id), sessionId: String(scheduled.id) },
    );
    expect(statusOf(coachPost)).toBe(404);
    expect(
      statusOf(
        await run(coachSession.loader, getRequest("/", oCookie), {
          athleteId: String(athlete.id),
          sessionId: String(scheduled.id),
        }),
      ),
    ).toBe(404);
    expect(await SessionComment.count({ where: { scheduledSessionId: scheduled.id } })).toBe(0);
    await expect(applyBoardOp(otherCoach.id, planId, { op: "note", itemId, notes: "mine now" })).rejects.toMatchObject({
      kind: "not_found",
    });
    expect((await PlanItem.findByPk(itemId))!.notes).toBe("Bring two bottles.");
  });
});
