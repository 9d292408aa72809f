import nodeIcal from "node-ical";
import { describe, expect, it } from "vitest";
import { CoachAthlete, FieldTest, ScheduledBlock, ScheduledSession, Threshold } from "~/.server/models";
import { buildFeed } from "~/.server/services/feed-calendar";
import { storeUpload } from "~/.server/services/uploads";
import { readUploadBody } from "~/routes/api/uploads.server";
import * as athleteSession from "~/routes/athlete/session";
import * as coachSession from "~/routes/coach/athlete-session";
import * as printView from "~/routes/pacing-print";
import { addDays, todayIn } from "~/lib/dates";
import { toCsv, type RideSample } from "../../db/demo/rides";
import { formRequest, getRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

async function scenario() {
  const coach = await makeUser({ role: "coach" });
  const athlete = await makeUser({ role: "athlete" });
  await CoachAthlete.create({ coachId: coach.id, athleteId: athlete.id });
  const t = await Threshold.create({
    athleteId: athlete.id,
    sport: "bike",
    metric: "power",
    value: 262,
    unit: "W",
    effectiveFrom: "2026-01-01",
    source: "manual",
  });
  const date = addDays(todayIn("UTC"), 3);
  const session = await ScheduledSession.create({
    athleteId: athlete.id,
    date,
    name: "20-minute field test",
    sport: "bike",
    testProtocol: "twenty_minute",
    plannedDurationS: 3300,
  });
  // The warm-up's target was resolved with the 262 W threshold: the plan must use the same number.
  await ScheduledBlock.create({
    scheduledSessionId: session.id,
    athleteId: athlete.id,
    date,
    sport: "bike",
    position: 0,
    blockIndex: 0,
    kind: "warmup",
    part: "main",
    rep: null,
    repCount: null,
    durationS: 900,
    metric: "power",
    lowPct: 50,
    highPct: 65,
    ramp: false,
    lowAbs: 131,
    highAbs: 170,
    unit: "W",
    thresholdId: t.id,
    thresholdValue: 262,
    cue: null,
    cadence: null,
  });
  return { coach, athlete, session, coachCookie: await signIn(coach.email), cookie: await signIn(athlete.email) };
}

/** 15 min warm-up, then a 20-minute effort ridden 250 / 275 / 300 W, then a cool-down. */
function rideFile(): File {
  const samples: RideSample[] = [];
  for (const [n, w] of [
    [900, 150],
    [400, 250],
    [400, 275],
    [400, 300],
    [300, 100],
  ] as const) {
    for (let i = 0; i < n; i++)
      samples.push({ t: samples.length, power: w + ((samples.length * 7) % 5) - 2, hr: 140, cadence: 90, speed: 9 });
  }
  return new File([toCsv(samples)], "test-day.csv", { type: "text/csv" });
}

describe("pacing plan on the test session and in its calendar event", () => {
  it("the athlete's test page carries the plan from the session's threshold, and its feed event lists the segments", async () => {
    const { athlete, session, cookie } = await scenario();
    const page = payloadOf(
      await run(athleteSession.loader, getRequest(`/athlete/sessions/${session.id}`, cookie), {
        id: String(session.id),
      }),
    );
    expect(page.pacing.plan.expectedW).toBe(276);
    expect(page.pacing.plan.segments.map((s: { targetW: number }) => s.targetW)).toEqual([268, 276, 284]);
    expect(page.pacing.basis).toMatchObject({ source: "threshold", thresholdW: 262 });

    const withLaps = payloadOf(
      await run(athleteSession.loader, getRequest(`/athlete/sessions/${session.id}?lapTime=5:00`, cookie), {
        id: String(session.id),
      }),
    );
    expect(withLaps.pacing.plan.laps.lapTimeS).toBe(300);
    expect(withLaps.pacing.plan.laps.laps[0].targetW).toBe(268);

    const { body } = await buildFeed(athlete);
    const events = Object.values(nodeIcal.sync.parseICS(body)).filter((e: any) => e.type === "VEVENT") as any[];
    const event = events.find((e) => String(e.uid) === `session-${session.id}@pacewright`);
    const text = String(event.description);
    expect(text).toContain("PACING PLAN: expected 276 W for 20 minutes (from a threshold of 262 W).");
    expect(text).toContain("0:00–6:40: 268 W (97 %), effort 7");
    expect(text).toContain("13:20–20:00: 284 W (103 %), effort 10");
  });

  it("a ramp of the previous week is a fresher basis than the session's threshold", async () => {
    const { athlete, session, cookie } = await scenario();
    await FieldTest.create({
      athleteId: athlete.id,
      protocol: "ramp",
      sport: "bike",
      metric: "power",
      inputs: {},
      derived: {},
      value: 270,
      unit: "W",
      testedOn: addDays(session.date, -6),
    });
    const page = payloadOf(
      await run(athleteSession.loader, getRequest(`/athlete/sessions/${session.id}`, cookie), {
        id: String(session.id),
      }),
    );
    expect(page.pacing.basis).toMatchObject({ source: "ramp", thresholdW: 270 });
    // 270 / 0.95 = 284.2 → 284 W
    expect(page.pacing.plan.expectedW).toBe(284);
  });

  it("the coach edits the split; the feed sequence moves on; a bad split changes nothing; another coach gets 404", async () => {
    const { athlete, session, coachCookie, cookie } = await scenario();
    const path = `/coach/athletes/${athlete.id}/sessions/${session.id}`;
    const params = { athleteId: String(athlete.id), sessionId: String(session.id) };
    const ok = await run(
      coachSession.action,
      formRequest(path, { intent: "pacing-split", split: ["96", "100", "104"] }, { cookie: coachCookie }),
      params,
    );
    expect(payloadOf(ok).ok).toBe(true);
    await session.reload();
    expect(JSON.parse(session.pacingSplit!)).toEqual([96, 100, 104]);
    expect(session.feedSequence).toBe(1);
    const page = payloadOf(
      await run(athleteSession.loader, getRequest(`/athlete/sessions/${session.id}`, cookie), {
        id: String(session.id),
      }),
    );
    expect(page.pacing.plan.segments.map((s: { targetW: number }) => s.targetW)).toEqual([265, 276, 287]);

    const bad = await run(
      coachSession.action,
      formRequest(path, { intent: "pacing-split", split: ["110", "110", "110"] }, { cookie: coachCookie }),
      params,
    );
    expect(statusOf(bad)).toBe(400);
    expect(payloadOf(bad).message).toMatch(/average/);
    await session.reload();
    expect(JSON.parse(session.pacingSplit!)).toEqual([96, 100, 104]);

    const stranger = await makeUser({ role: "coach" });
    const other = await run(
      coachSession.action,
      formRequest(
        path,
        { intent: "pacing-split", split: ["97", "100", "103"] },
        { cookie: await signIn(stranger.email) },
      ),
      params,
    );
    expect(statusOf(other)).toBe(404);
    const print = await run(printView.loader, getRequest(`${path}/pacing`, await signIn(stranger.email)), params);
    expect(statusOf(print)).toBe(404);
  });

  it("after the ride, the file's best 20 minutes are laid against the plan segment by segment", async () => {
    const { athlete, session, cookie } = await scenario();
    const form = new FormData();
    form.append("file", rideFile());
    const { upload } = await storeUpload(
      await readUploadBody(new Request("http://localhost:3999/api/uploads", { method: "POST", body: form })),
      athlete,
      athlete,
    );
    await session.update({ uploadId: upload.id, status: "done" });
    const page = payloadOf(
      await run(athleteSession.loader, getRequest(`/athlete/sessions/${session.id}`, cookie), {
        id: String(session.id),
      }),
    );
    const outcome = page.pacing.outcome;
    expect(outcome.effortStartS).toBe(900);
    expect(outcome.segments.map((s: { riddenW: number }) => s.riddenW)).toEqual([250, 275, 300]);
    expect(outcome.segments.map((s: { plannedW: number }) => s.plannedW)).toEqual([268, 276, 284]);
    // Planned rise 16 W (5.8 % of 276), ridden 50 W (18.2 % of 275): held back.
    expect(outcome.verdict).toBe("held_back");
    expect(outcome.message).toMatch(/proposed 261 W/);
  });
});
