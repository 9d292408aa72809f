import { QueryTypes } from "sequelize";
import { describe, expect, it } from "vitest";
import { db } from "~/.server/db";
import {
  CoachAthlete,
  FieldTest,
  OutboundEmail,
  PlanItem,
  PlanWeek,
  RescaleReport,
  ShelfSession,
  ShelfBlock,
  Threshold,
} from "~/.server/models";
import { rosterFor } from "~/.server/services/roster";
import { applyBoardOp } from "~/.server/services/board";
import { assignPlan } from "~/.server/services/materialize";
import { createPlan } from "~/.server/services/plans";
import * as tests from "~/routes/athlete/tests";
import * as testNew from "~/routes/athlete/test-new";
import * as preview from "~/routes/api/tests-preview";
import * as uploads from "~/routes/api/uploads";
import { toCsv, type RideSample } from "../../db/demo/rides";
import { BASE, fieldErrorsOf, getRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

const READY = { answers: ["no", "no", "no", "no", "no"], stopSignsRead: true };

/** Synthetic ride: segments of [seconds, watts], a small deterministic wobble, heart rate following power. */
function ride(segments: [number, number][], hr = (w: number) => Math.round(100 + w / 4)): RideSample[] {
  const out: RideSample[] = [];
  for (const [n, w] of segments)
    for (let i = 0; i < n; i++)
      out.push({ t: out.length, power: w + ((out.length * 7) % 9) - 4, hr: hr(w), cadence: 88, speed: 9 });
  return out;
}
/** A 20-minute test ridden as three rising laps (about 170, 200, 236 W) inside a warm-up and cool-down. */
const risingLaps = () =>
  ride([
    [900, 150],
    [400, 170],
    [400, 200],
    [400, 236],
    [600, 100],
  ]);

/** A coached athlete at 276 W with four weeks of planned threshold sessions from 2 November 2026. */
async function scenario(opts: { power?: number | null; weightKg?: number } = {}) {
  const coach = await makeUser({ role: "coach", name: "Coach Ines" });
  const athlete = await makeUser({ role: "athlete", name: "Rider Ola" });
  if (opts.weightKg) await athlete.update({ weightKg: opts.weightKg });
  await CoachAthlete.create({ coachId: coach.id, athleteId: athlete.id });
  if (opts.power !== null)
    await Threshold.create({
      athleteId: athlete.id,
      sport: "bike",
      metric: "power",
      value: opts.power ?? 276,
      unit: "W",
      effectiveFrom: "2026-01-01",
      source: "manual",
    });
  const s = await ShelfSession.create({ ownerId: coach.id, name: "Threshold", sport: "bike" });
  await ShelfBlock.create({
    sessionId: s.id,
    position: 0,
    kind: "steady",
    spec: { kind: "steady", durationS: 1200, target: { metric: "power", lowPct: 95, highPct: 100 } },
  });
  const plan = await createPlan(coach.id, {
    name: "Guard",
    sport: "bike",
    description: "",
    alignment: "start",
    date: "2026-11-02",
    weeks: 4,
    weeklyHours: 6,
    pattern: "3:1",
    testEveryWeeks: 6,
  });
  await PlanItem.destroy({ where: { planId: plan.id } });
  for (const w of await PlanWeek.findAll({ where: { planId: plan.id } }))
    await applyBoardOp(coach.id, plan.id, { op: "copy", sessionId: s.id, toWeek: w.id, toDay: 1, toIndex: 0 });
  await assignPlan(coach, plan.id, [athlete.id], { mode: "start", date: "2026-11-02" });
  return { coach, athlete, cookie: await signIn(athlete.email), coachCookie: await signIn(coach.email) };
}

const written = async (athleteId: number) => ({
  tests: await FieldTest.count({ where: { athleteId } }),
  thresholds: await Threshold.count({ where: { athleteId } }),
  reports: await RescaleReport.count({ where: { athleteId } }),
  mails: await OutboundEmail.count(),
  blocks: await db().query(
    "SELECT id, low_abs, high_abs, threshold_value FROM scheduled_blocks WHERE athlete_id = ? ORDER BY id",
    { replacements: [athleteId], type: QueryTypes.SELECT },
  ),
});

const save = (body: unknown, cookie: string) =>
  run(
    testNew.action,
    new Request(`${BASE}/athlete/tests/new`, {
      method: "POST",
      body: JSON.stringify(body),
      headers: { "Content-Type": "application/json", Cookie: cookie },
    }),
  );
const ask = async (body: unknown, cookie: string) => {
  const res = (await run(
    preview.action,
    new Request(`${BASE}/api/tests/preview`, {
      method: "POST",
      body: JSON.stringify(body),
      headers: { Cookie: cookie, "Content-Type": "application/json" },
    }),
  )) as Response;
  return { status: res.status, body: await res.json() };
};
const upload = async (cookie: string, samples: RideSample[], name = "laps.csv") => {
  const form = new FormData();
  form.append("file", new File([toCsv(samples)], name));
  const res = (await run(
    uploads.action,
    new Request(`${BASE}/api/uploads`, { method: "POST", body: form, headers: { Cookie: cookie } }),
  )) as Response;
  expect(res.status).toBe(201);
  return (await res.json()).upload as { id: number };
};

describe("plausibility guard", () => {
  it("a rising-laps 20-minute file at −30 % is flagged with its reasons; an unconfirmed save writes nothing, a confirmed one saves and is recorded", async () => {
    const { athlete, coach, cookie } = await scenario();
    const file = await upload(cookie, risingLaps());
    const body = { protocol: "twenty_minute", uploadId: file.id, testedOn: "2026-11-10" };
    const p = await ask(body, cookie);
    expect(p.status).toBe(200);
    // Best 20 minutes = the three laps, mean ≈ 202 W → 95 % ≈ 192 W (common practice factor), against 276 W.
    expect(p.body.proposed.value).toBe(192);
    expect(p.body.guard.flagged).toBe(true);
    expect(p.body.guard.changePct).toBeCloseTo((192 / 276 - 1) * 100, 1);
    expect(p.body.guard.headline).toMatch(/lower the threshold by −30\.4 %/);
    expect(p.body.pacing.verdict).toBe("rising");
    expect(p.body.pacing.advice).toMatch(/held back/);
    expect(p.body.guard.reasons.join(" ")).toMatch(/Pacing: the last third was 3\d % stronger/);
    expect(p.body.guard.reasons.join(" ")).toMatch(/Protocol: the current threshold came from a typed threshold/);

    const before = await written(athlete.id);
    const refused = await save({ ...body, readiness: READY }, cookie);
    expect(statusOf(refused)).toBe(409);
    expect(fieldErrorsOf(refused)).toEqual({ confirm: expect.stringMatching(/confirm the change/) });
    expect(await written(athlete.id)).toEqual(before);
    // "confirmed: false" is the same as no confirmation.
    expect(statusOf(await save({ ...body, readiness: READY, confirmed: false }, cookie))).toBe(409);
    expect(await written(athlete.id)).toEqual(before);

    const ok = await save({ ...body, readiness: READY, confirmed: true }, cookie);
    expect(statusOf(ok)).toBe(302);
    const report = (await RescaleReport.findOne({ where: { athleteId: athlete.id, kind: "apply" } }))!;
    expect(report).toMatchObject({ oldValue: 276, newValue: 192, confirmedBy: athlete.id });
    expect(report.confirmedAt).toBeInstanceOf(Date);
    expect(report.guard).toMatchObject({ flagged: true, changePct: -30.4 });
    expect(report.guard!.reasons.length).toBeGreaterThan(1);
    // The summary to the coach says the change was checked and confirmed, by whom.
    const mail = await OutboundEmail.findOne({ where: { toAddress: coach.email, template: "rescale-summary" } });
    expect(mail!.textBody).toMatch(/Rider Ola saw the likely reasons and confirmed the change/);
  });

  it("a change within ±8 % is not flagged and saves without confirmation", async () => {
    const { athlete, cookie } = await scenario();
    // 305 × 0.95 = 289.75 → 290 W, +5.1 % on 276 W.
    const p = await ask({ protocol: "twenty_minute", inputs: { meanW: "305" }, testedOn: "2026-11-10" }, cookie);
    expect(p.body.guard).toMatchObject({ flagged: false, changePct: 5.1, reasons: [] });
    expect(
      statusOf(
        await save(
          { protocol: "twenty_minute", inputs: { meanW: "305" }, testedOn: "2026-11-10", readiness: READY },
          cookie,
        ),
      ),
    ).toBe(302);
    expect((await RescaleReport.findOne({ where: { athleteId: athlete.id } }))!.confirmedBy).toBeNull();
  });

  it("a typed jump over a typed threshold names the typing as a likely reason", async () => {
    const { cookie } = await scenario();
    const p = await ask(
      { protocol: "manual", inputs: { sport: "bike", metric: "power", value: "320" }, testedOn: "2026-11-10" },
      cookie,
    );
    expect(p.body.guard).toMatchObject({ flagged: true, changePct: 15.9 });
    expect(p.body.guard.reasons[0]).toMatch(/^Protocol: the result was typed/);
    expect(p.body.guard.reasons.join(" ")).not.toMatch(/enter a threshold/i);
  });

  it("a first test far from what the profile suggests is flagged (60 kg, 450 W = 7.5 W/kg)", async () => {
    const { cookie } = await scenario({ power: null, weightKg: 60 });
    const p = await ask(
      { protocol: "manual", inputs: { sport: "bike", metric: "power", value: "450" }, testedOn: "2026-11-10" },
      cookie,
    );
    expect(p.body.current).toBeNull();
    expect(p.body.guard.flagged).toBe(true);
    expect(p.body.guard.reasons.join(" ")).toMatch(/90–330 W/);
    const fine = await ask(
      { protocol: "manual", inputs: { sport: "bike", metric: "power", value: "210" }, testedOn: "2026-11-10" },
      cookie,
    );
    expect(fine.body.guard.flagged).toBe(false);
  });

  it("a slow ramp (5 W a minute) is detected as such, says the 75 % rule does not hold, and needs confirmation", async () => {
    const { cookie } = await scenario({ power: 190 });
    const steps: [number, number][] = [[600, 100]];
    for (let w = 125; w <= 250; w += 5) steps.push([60, w]);
    steps.push([300, 80]);
    const file = await upload(cookie, ride(steps), "slow-ramp.csv");
    const p = await ask({ protocol: "ramp", uploadId: file.id, testedOn: "2026-11-10" }, cookie);
    expect(p.status).toBe(200);
    expect(p.body.ramp).toMatchObject({ withinUsual: false, detected: { stepS: 60, steps: 26 } });
    expect(p.body.ramp.rateWPerMin).toBeCloseTo(5, 1);
    // 0.75 × 250 W ≈ 188 W: within 8 % of 190 W, yet flagged because the rule does not transfer to this rate.
    expect(Math.abs(p.body.guard.changePct)).toBeLessThan(8);
    expect(p.body.guard.flagged).toBe(true);
    expect(p.body.guard.reasons[0]).toMatch(
      /rose 5 W a minute.*20–25 W a minute.*confirm it with a 20-minute or 8-minute test/,
    );
  });
});

describe("bounds on typed values", () => {
  it("refuses absurd values per metric and sport with a clear message, in preview and save, and writes nothing", async () => {
    const { athlete, cookie } = await scenario();
    const before = await written(athlete.id);
    const cases: [unknown, RegExp][] = [
      [
        { protocol: "manual", inputs: { sport: "bike", metric: "power", value: "1e300" } },
        /cycling power threshold lies between 50 W and 600 W/,
      ],
      [{ protocol: "manual", inputs: { sport: "bike", metric: "power", value: "0.0001" } }, /between 50 W and 600 W/],
      [
        { protocol: "manual", inputs: { sport: "bike", metric: "heart_rate", value: "25" } },
        /threshold heart rate lies between 100 bpm and 210 bpm/,
      ],
      [
        { protocol: "manual", inputs: { sport: "run", metric: "pace", value: "30" } },
        /running threshold pace lies between 2:40 per km and 12:00 per km/,
      ],
      [{ protocol: "manual", inputs: { sport: "swim", metric: "pace", value: "1e300" } }, /swimming threshold pace/],
      [{ protocol: "manual", inputs: { sport: "bike", metric: "power", value: "Infinity" } }, /as a number/],
      [{ protocol: "twenty_minute", inputs: { meanW: "0.0001" } }, /20-minute mean power must be 50–700 W/],
      [{ protocol: "twenty_minute", inputs: { meanW: "1e300" } }, /20-minute mean power must be 50–700 W/],
      [{ protocol: "ramp", inputs: { bestOneMinuteW: "380" } }, /watts the ramp added each minute/],
      [{ protocol: "ramp", inputs: { bestOneMinuteW: "380", rampRateWPerMin: "0.001" } }, /ramp rate must be 1–100 W/],
      [
        {
          protocol: "critical_power",
          inputs: {
            efforts: [
              { duration: "3:00", meanW: "400" },
              { duration: "6:00", meanW: "420" },
              { duration: "12:00", meanW: "300" },
            ],
          },
        },
        /6:00 effort \(420 W\) is not below the 3:00 effort \(400 W\)/,
      ],
    ];
    for (const [body, message] of cases) {
      const p = await ask({ ...(body as object), testedOn: "2026-11-10" }, cookie);
      expect(p.status, JSON.stringify(body)).toBe(400);
      expect(p.body.error, JSON.stringify(body)).toMatch(message);
      const s = await save({ ...(body as object), testedOn: "2026-11-10", readiness: READY, confirmed: true }, cookie);
      expect(statusOf(s), JSON.stringify(body)).toBe(400);
      expect(Object.values(fieldErrorsOf(s)).join(" ")).toMatch(message);
    }
    expect(await written(athlete.id)).toEqual(before);
  });
});

describe("undo is honest", () => {
  it("the test stays listed as undone with who and when, thresholds and roster agree, and athlete and coach get a correction", async () => {
    const { athlete, coach, coachCookie, cookie } = await scenario();
    expect(
      statusOf(
        await save(
          { protocol: "twenty_minute", inputs: { meanW: "300" }, testedOn: "2026-11-10", readiness: READY },
          cookie,
        ),
      ),
    ).toBe(302);
    const test = (await FieldTest.findOne({ where: { athleteId: athlete.id } }))!;
    const listed = async (c: string, path: string, params: Record<string, string> = {}) =>
      payloadOf(await run(tests.loader, getRequest(path, c), params));
    const live = await listed(cookie, "/athlete/tests");
    expect(live.tests[0]).toMatchObject({ status: "active", inForce: true, undoneAt: null });
    expect(live.current.find((t: { metric: string }) => t.metric === "power").value).toBe(285);

    const res = await run(
      tests.action,
      new Request(`${BASE}/coach/athletes/${athlete.id}/tests`, {
        method: "POST",
        body: new URLSearchParams({ testId: String(test.id) }),
        headers: { Cookie: coachCookie, "Content-Type": "application/x-www-form-urlencoded" },
      }),
      { athleteId: String(athlete.id) },
    );
    expect(payloadOf(res)).toMatchObject({
      status: "success",
      message: expect.stringMatching(/correction has been e-mailed/),
    });

    const after = await listed(cookie, "/athlete/tests");
    expect(after.tests).toHaveLength(1);
    expect(after.tests[0]).toMatchObject({
      id: test.id,
      status: "undone",
      inForce: false,
      canUndo: false,
      undoneBy: "Coach Ines",
    });
    expect(after.tests[0].undoneAt.slice(0, 10)).toBe(new Date().toISOString().slice(0, 10));
    // Current thresholds, the history chart's points and the roster all read 276 W again.
    expect(after.current.find((t: { metric: string }) => t.metric === "power").value).toBe(276);
    expect(
      after.thresholds.filter((t: { metric: string }) => t.metric === "power").map((t: { value: number }) => t.value),
    ).toEqual([276]);
    const roster = await rosterFor(coach.id);
    expect(roster.athletes.find((a: { id: number }) => a.id === athlete.id)!.thresholds).toEqual([
      expect.objectContaining({ sport: "bike", metric: "power", value: 276, unit: "W" }),
    ]);

    const corrections = await OutboundEmail.findAll({ where: { template: "rescale-undone" } });
    expect(corrections.map((m) => m.toAddress).sort()).toEqual([athlete.email, coach.email].sort());
    const toAthlete = corrections.find((m) => m.toAddress === athlete.email)!;
    expect(toAthlete.subject).toBe("Correction: Rider Ola's power threshold is back to 276 W");
    expect(toAthlete.textBody).toMatch(/set Rider Ola's power threshold to 285 W, was removed by Coach Ines/);
    expect(toAthlete.textBody).toMatch(/\d+ planned sessions \(\d+ steps\) are back/);
    expect(corrections.find((m) => m.toAddress === coach.email)!.textBody).toMatch(/removed by you/);
  });
});
