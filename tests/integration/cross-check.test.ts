import { describe, expect, it } from "vitest";
import { CoachAthlete, OutboundEmail, RescaleReport, Threshold } from "~/.server/models";
import { saveTest } from "~/.server/services/field-tests";
import * as tests from "~/routes/athlete/tests";
import { firstMessage, messageOf } from "~/lib/forms";
import { formRequest, getRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

const READY = { answers: ["no", "no", "no", "no", "no"], stopSignsRead: true };

async function scenario() {
  const coach = await makeUser({ role: "coach" });
  const athlete = await makeUser({ role: "athlete" });
  await CoachAthlete.create({ coachId: coach.id, athleteId: athlete.id });
  await Threshold.create({
    athleteId: athlete.id,
    sport: "bike",
    metric: "power",
    value: 276,
    unit: "W",
    effectiveFrom: "2026-01-01",
    source: "manual",
  });
  return { coach, athlete, cookie: await signIn(athlete.email), coachCookie: await signIn(coach.email) };
}

describe("running paces on the athlete's tests page", () => {
  it("a race gives the five training paces, each as % of threshold speed", async () => {
    const { athlete, cookie } = await scenario();
    // 10 km in 40:00 → running index ≈ 51.9 (Daniels–Gilbert).
    await saveTest(athlete, athlete, {
      protocol: "run_race",
      inputs: { distanceM: 10000, time: "40:00" },
      testedOn: "2026-11-01",
      readiness: READY,
    });
    const page = payloadOf(await run(tests.loader, getRequest("/athlete/tests", cookie)));
    const paces = page.runningPaces;
    expect(paces.index).toBeCloseTo(51.9, 0);
    expect(paces.rows.map((r: { key: string }) => r.key)).toEqual([
      "easy",
      "marathon",
      "threshold",
      "interval",
      "repetition",
    ]);
    const t = paces.rows.find((r: { key: string }) => r.key === "threshold");
    expect(t.lowPct).toBe(100);
    expect(paces.rows.find((r: { key: string }) => r.key === "interval").lowPct).toBeGreaterThan(100);
    expect(paces.rows.find((r: { key: string }) => r.key === "easy").lowPct).toBeLessThan(85);
  });
});

describe("cross-check between two tests within 14 days", () => {
  it("shows both estimates, and the mean chosen becomes the threshold recording both tests", async () => {
    const { athlete, coach, cookie } = await scenario();
    const a = await saveTest(athlete, athlete, {
      protocol: "twenty_minute",
      inputs: { meanW: 290 },
      testedOn: "2026-11-03",
      readiness: READY,
    });
    const b = await saveTest(athlete, athlete, {
      protocol: "eight_minute",
      inputs: { meanW: 310 },
      testedOn: "2026-11-10",
      readiness: READY,
    });
    const page = payloadOf(await run(tests.loader, getRequest("/athlete/tests", cookie)));
    expect(page.crossChecks).toHaveLength(1);
    const pair = page.crossChecks[0];
    expect(pair.tests.map((t: { value: number }) => t.value)).toEqual([276, 279]);
    expect(pair.check).toMatchObject({ diffPct: 1.1, agreement: "agree" });

    const res = await run(
      tests.action,
      formRequest(
        "/athlete/tests",
        { intent: "cross-check", aId: String(a.test.id), bId: String(b.test.id), choice: "mean" },
        { cookie },
      ),
    );
    expect(payloadOf(res).status).toBe("success");
    const latest = await Threshold.findOne({ where: { athleteId: athlete.id }, order: [["id", "DESC"]] });
    expect(latest!.value).toBe(278);
    expect(latest!.source).toBe("cross_check");
    expect(latest!.effectiveFrom).toBe("2026-11-10");
    expect(JSON.parse(latest!.sourceTests!)).toEqual({
      pair: [a.test.id, b.test.id],
      choice: "mean",
      tests: [a.test.id, b.test.id],
    });
    const again = payloadOf(await run(tests.loader, getRequest("/athlete/tests", cookie)));
    expect(again.crossChecks[0].settled).toMatchObject({ choice: "mean" });
    // The threshold history says which tests each value came from.
    const basis = again.thresholds.map((t: { basis: string }) => t.basis);
    expect(basis).toContain("From the 20-minute test of 2026-11-03");
    expect(basis.at(-1)).toBe(
      "Cross-check: mean of the 20-minute test of 2026-11-03 and the 8-minute test of 2026-11-10",
    );
    // Athlete and coach hear of it as of a saved test, with what it changed.
    const mails = await OutboundEmail.findAll({ where: { template: "rescale-summary" }, order: [["id", "ASC"]] });
    const crossMails = mails.filter((m) => m.textBody.includes("cross-check"));
    expect(crossMails.map((m) => m.toAddress).sort()).toEqual([athlete.email, coach.email].sort());
    expect(crossMails[0].textBody).toMatch(/threshold to 278 W/);
  });

  it("a large change from the cross-check goes through the guard: refused without confirmation, saved and recorded with it", async () => {
    const { athlete, coach, coachCookie } = await scenario();
    const a = await saveTest(athlete, athlete, {
      protocol: "twenty_minute",
      inputs: { meanW: 290 },
      testedOn: "2026-11-03",
      readiness: READY,
    });
    const b = await saveTest(athlete, athlete, {
      protocol: "eight_minute",
      inputs: { meanW: 350 },
      testedOn: "2026-11-12",
      readiness: READY,
      confirmed: true,
    });
    const path = `/coach/athletes/${athlete.id}/tests`;
    const params = { athleteId: String(athlete.id) };
    const before = await Threshold.count({ where: { athleteId: athlete.id } });
    const refused = await run(
      tests.action,
      formRequest(
        path,
        { intent: "cross-check", aId: String(a.test.id), bId: String(b.test.id), choice: "a" },
        { cookie: coachCookie },
      ),
      params,
    );
    expect(statusOf(refused)).toBe(409);
    // The message sits beside the tick it asks for.
    expect(messageOf(payloadOf(refused), "confirm")).toMatch(/confirm the change/);
    expect(await Threshold.count({ where: { athleteId: athlete.id } })).toBe(before);
    const page = payloadOf(await run(tests.loader, getRequest(path, coachCookie), params));
    expect(page.crossChecks[0].check.agreement).toBe("disagree");

    const ok = await run(
      tests.action,
      formRequest(
        path,
        { intent: "cross-check", aId: String(a.test.id), bId: String(b.test.id), choice: "a", confirmed: "1" },
        { cookie: coachCookie },
      ),
      params,
    );
    expect(payloadOf(ok).status).toBe("success");
    const latest = await Threshold.findOne({ where: { athleteId: athlete.id }, order: [["id", "DESC"]] });
    expect(latest!.value).toBe(276);
    expect(JSON.parse(latest!.sourceTests!).tests).toEqual([a.test.id]);
    const report = await RescaleReport.findOne({ where: { athleteId: athlete.id }, order: [["id", "DESC"]] });
    expect(report!.confirmedBy).toBe(coach.id);
    expect((report!.guard as { flagged: boolean }).flagged).toBe(true);
  });

  it("tests further apart than 14 days, a bad choice, or someone else's athlete change nothing", async () => {
    const { athlete, cookie } = await scenario();
    const a = await saveTest(athlete, athlete, {
      protocol: "twenty_minute",
      inputs: { meanW: 290 },
      testedOn: "2026-10-01",
      readiness: READY,
    });
    const b = await saveTest(athlete, athlete, {
      protocol: "eight_minute",
      inputs: { meanW: 310 },
      testedOn: "2026-11-10",
      readiness: READY,
    });
    expect(payloadOf(await run(tests.loader, getRequest("/athlete/tests", cookie))).crossChecks).toEqual([]);
    const far = await run(
      tests.action,
      formRequest(
        "/athlete/tests",
        { intent: "cross-check", aId: String(a.test.id), bId: String(b.test.id), choice: "mean" },
        { cookie },
      ),
    );
    expect(statusOf(far)).toBe(400);
    expect(firstMessage(payloadOf(far))).toMatch(/14 days/);
    const bad = await run(
      tests.action,
      formRequest(
        "/athlete/tests",
        { intent: "cross-check", aId: String(a.test.id), bId: String(b.test.id), choice: "max" },
        { cookie },
      ),
    );
    expect(statusOf(bad)).toBe(400);
    expect(messageOf(payloadOf(bad), "choice")).toBe("Choose one test or their mean.");
    const stranger = await makeUser({ role: "coach" });
    const other = await run(
      tests.action,
      formRequest(
        `/coach/athletes/${athlete.id}/tests`,
        { intent: "cross-check", aId: String(a.test.id), bId: String(b.test.id), choice: "mean" },
        { cookie: await signIn(stranger.email) },
      ),
      { athleteId: String(athlete.id) },
    );
    expect(statusOf(other)).toBe(404);
  });
});
