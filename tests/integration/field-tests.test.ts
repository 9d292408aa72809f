import fs from "node:fs";
import path from "node:path";
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
  ScheduledBlock,
  ScheduledSession,
  ShelfSession,
  ShelfBlock,
  Threshold,
  Upload,
} from "~/.server/models";
import { createPlan } from "~/.server/services/plans";
import { applyBoardOp } from "~/.server/services/board";
import { assignPlan } from "~/.server/services/materialize";
import * as testNew from "~/routes/athlete/test-new";
import * as tests from "~/routes/athlete/tests";
import * as preview from "~/routes/api/tests-preview";
import * as uploads from "~/routes/api/uploads";
import { resolveTarget } from "~/lib/training";
import { toCsv, toFit, toGpx, twentyMinuteTestRide } from "../../db/demo/rides";
import { messageOf } from "~/lib/forms";
import { fieldErrorsOf, getRequest, makeUser, payloadOf, run, signIn, statusOf, toastOf } from "./helpers";

/** A refused save carries one message, under its field or the form's. */
const saveMessage = (res: unknown) => Object.values(fieldErrorsOf(res)).join(" ");
import { injectUpdateFault } from "./schema";

const BASE = "http://localhost:3999";
const READY = { answers: ["no", "no", "no", "no", "no"], stopSignsRead: true };

/** An athlete at 250 W / 170 bpm / 4:00 per km with an 8-week plan from Monday 2 November 2026. */
async function scenario() {
  const coach = await makeUser({ role: "coach" });
  const athlete = await makeUser({ role: "athlete" });
  const bystander = await makeUser({ role: "athlete" });
  await CoachAthlete.bulkCreate([
    { coachId: coach.id, athleteId: athlete.id },
    { coachId: coach.id, athleteId: bystander.id },
  ]);
  for (const a of [athlete, bystander]) {
    await Threshold.bulkCreate([
      {
        athleteId: a.id,
        sport: "bike",
        metric: "power",
        value: 250,
        unit: "W",
        effectiveFrom: "2026-01-01",
        source: "manual",
      },
      {
        athleteId: a.id,
        sport: "bike",
        metric: "heart_rate",
        value: 170,
        unit: "bpm",
        effectiveFrom: "2026-01-01",
        source: "manual",
      },
      {
        athleteId: a.id,
        sport: "run",
        metric: "pace",
        value: 240,
        unit: "s/km",
        effectiveFrom: "2026-01-01",
        source: "manual",
      },
    ]);
  }
  const mk = async (name: string, sport: string, blocks: unknown[]) => {
    const s = await ShelfSession.create({ ownerId: coach.id, name, sport });
    await ShelfBlock.bulkCreate(
      blocks.map((spec, position) => ({ sessionId: s.id, position, kind: (spec as { kind: string }).kind, spec })),
    );
    return s;
  };
  const power = await mk("Threshold", "bike", [
    { kind: "warmup", durationS: 600, target: { metric: "power", lowPct: 55, highPct: 65 } },
    {
      kind: "repeats",
      count: 3,
      work: { durationS: 600, target: { metric: "power", lowPct: 97, highPct: 103 } },
      recovery: { durationS: 180, target: { metric: "power", lowPct: 51 } },
    },
    { kind: "ramp", durationS: 300, metric: "power", fromPct: 73, toPct: 41 },
  ]);
  const hr = await mk("HR ride", "bike", [
    { kind: "steady", durationS: 3000, target: { metric: "heart_rate", lowPct: 81, highPct: 88 } },
  ]);
  const runS = await mk("Run tempo", "run", [
    { kind: "steady", durationS: 1800, target: { metric: "pace", lowPct: 88, highPct: 93 } },
  ]);
  const plan = await createPlan(coach.id, {
    name: "Rescale",
    sport: "bike",
    description: "",
    alignment: "start",
    date: "2026-11-02",
    weeks: 8,
    weeklyHours: 8,
    pattern: "3:1",
    testEveryWeeks: 6,
  });
  await PlanItem.destroy({ where: { planId: plan.id } });
  const weeks = await PlanWeek.findAll({ where: { planId: plan.id }, order: [["idx", "ASC"]] });
  for (const w of weeks) {
    await applyBoardOp(coach.id, plan.id, { op: "copy", sessionId: power.id, toWeek: w.id, toDay: 1, toIndex: 0 });
    await applyBoardOp(coach.id, plan.id, { op: "copy", sessionId: hr.id, toWeek: w.id, toDay: 3, toIndex: 0 });
    await applyBoardOp(coach.id, plan.id, { op: "copy", sessionId: runS.id, toWeek: w.id, toDay: 5, toIndex: 0 });
  }
  await assignPlan(coach, plan.id, [athlete.id, bystander.id], {
    mode: "start",
    date: "2026-11-02",
    choice: { overlap: "alongside", confirmSports: true, confirmTests: true },
  });
  // After the test date: one session done, one skipped. They must never change.
  const after = await ScheduledSession.findAll({
    where: { athleteId: athlete.id, name: "Threshold" },
    order: [["date", "ASC"]],
  });
  await after.find((s) => s.date === "2026-11-24")!.update({ status: "done", effortScore: 7 });
  await after.find((s) => s.date === "2026-12-01")!.update({ status: "skipped" });
  return { coach, athlete, bystander, cookie: await signIn(athlete.email), coachCookie: await signIn(coach.email) };
}

const snapshot = async () =>
  db().query<Record<string, unknown>>(
    "SELECT b.id, b.low_abs, b.high_abs, b.unit, b.threshold_id, b.threshold_value, s.feed_sequence, s.status FROM scheduled_blocks b JOIN scheduled_sessions s ON s.id = b.scheduled_session_id ORDER BY b.id",
    { type: QueryTypes.SELECT },
  );

function save(body: unknown, cookie: string, athleteId?: number) {
  const req = new Request(`${BASE}${athleteId ? `/coach/athletes/${athleteId}` : "/athlete"}/tests/new`, {
    method: "POST",
    body: JSON.stringify(body),
    headers: { "Content-Type": "application/json", Cookie: cookie },
  });
  return run(testNew.action, req, athleteId ? { athleteId: String(athleteId) } : {});
}

describe("field test → rescale", () => {
  it("a 20-minute test rescales every future planned power step, and nothing else", async () => {
    const { athlete, bystander, cookie } = await scenario();
    const before = new Map((await snapshot()).map((r) => [r.id, r]));
    const res = await save(
      {
        protocol: "twenty_minute",
        inputs: { meanW: "300" },
        testedOn: "2026-11-20",
        readiness: READY,
        requestKey: "k-20min-1",
        confirmed: true,
      },
      cookie,
    );
    expect(statusOf(res)).toBe(302);
    expect((res as Response).headers.get("location")).toBe("/athlete/tests");
    expect(await toastOf(res as Response)).toEqual({
      tone: "ok",
      message: expect.stringMatching(
        /^Saved\. Bike power is now 285 W \(was 250 W\): \d+ planned sessions, \d+ steps rescaled\./,
      ),
    });

    const t = await Threshold.findOne({
      where: { athleteId: athlete.id, sport: "bike", metric: "power", effectiveFrom: "2026-11-20" },
    });
    expect(t!.value).toBe(285); // 300 × 0.95
    const report = await RescaleReport.findOne({ where: { athleteId: athlete.id, kind: "apply" } });
    expect(report).toMatchObject({ oldValue: 250, newValue: 285, fromDate: "2026-11-20" });

    const rows = await ScheduledBlock.findAll({ where: { athleteId: athlete.id } });
    const sessions = new Map(
      (await ScheduledSession.findAll({ where: { athleteId: athlete.id } })).map((s) => [s.id, s]),
    );
    let changed = 0;
    for (const b of rows) {
      const s = sessions.get(b.scheduledSessionId)!;
      const old = before.get(b.id)!;
      const inScope = b.metric === "power" && b.date >= "2026-11-20" && s.status === "planned";
      if (inScope) {
        changed++;
        // The set-based SQL gives exactly what the engine gives.
        expect([b.lowAbs, b.highAbs]).toEqual([
          resolveTarget({ metric: "power", lowPct: b.lowPct! }, 285).low,
          resolveTarget({ metric: "power", lowPct: b.highPct! }, 285).low,
        ]);
        expect(b.thresholdId).toBe(t!.id);
        expect(s.feedSequence).toBe(1);
      } else {
        expect([b.lowAbs, b.highAbs, b.thresholdId]).toEqual([old.low_abs, old.high_abs, old.threshold_id]);
      }
    }
    expect(changed).toBe(report!.blocksChanged);
    // Threshold sessions fall on Tuesdays; on or after 20 Nov: 24 Nov (done), 1 Dec (skipped), 8, 15 and 22 Dec.
    expect(report!.sessionsChanged).toBe(3);
    // The bystander is untouched.
    const bRows = await ScheduledBlock.findAll({ where: { athleteId: bystander.id, metric: "power", part: "work" } });
    expect(bRows.every((b) => b.thresholdValue === 250)).toBe(true);
    // Athlete and coach get the summary.
    const mails = await OutboundEmail.findAll({ where: { template: "rescale-summary" } });
    expect(mails.map((m) => m.toAddress)).toEqual(expect.arrayContaining([athlete.email]));
    expect(mails.find((m) => m.toAddress === athlete.email)!.textBody).toContain("285 W");
  });

  it("rescales pace as the inverse and heart rate as a percentage", async () => {
    const { athlete, cookie } = await scenario();
    await save(
      { protocol: "run_race", inputs: { distanceM: "10000", time: "40:00" }, testedOn: "2026-11-20", readiness: READY },
      cookie,
    );
    const pace = await Threshold.findOne({
      where: { athleteId: athlete.id, sport: "run", metric: "pace", source: "field_test" },
    });
    // Running index 51.94 → threshold pace ≈ 4:07 per km (Daniels & Gilbert; cost = 0.88 × index).
    expect(pace!.value).toBeGreaterThan(245);
    expect(pace!.value).toBeLessThan(250);
    const b = await ScheduledBlock.findOne({ where: { athleteId: athlete.id, metric: "pace", date: "2026-12-05" } });
    expect(b).toMatchObject({
      lowAbs: Math.round(pace!.value / 0.88),
      highAbs: Math.round(pace!.value / 0.93),
      unit: "s/km",
    });

    await save(
      { protocol: "hr_thirty", inputs: { sport: "bike", meanHr: "176" }, testedOn: "2026-11-21", readiness: READY },
      cookie,
    );
    const h = await ScheduledBlock.findOne({
      where: { athleteId: athlete.id, metric: "heart_rate", date: "2026-12-03" },
    });
    expect(h).toMatchObject({ lowAbs: Math.round((81 * 176) / 100), highAbs: Math.round((88 * 176) / 100) });
    const earlier = await ScheduledBlock.findOne({
      where: { athleteId: athlete.id, metric: "heart_rate", date: "2026-11-19" },
    });
    expect(earlier!.thresholdValue).toBe(170);
  });

  it("undo restores exactly the previous values, with its own report", async () => {
    const { athlete, cookie } = await scenario();
    const before = await snapshot();
    await save(
      {
        protocol: "twenty_minute",
        inputs: { meanW: "320" },
        testedOn: "2026-11-20",
        readiness: READY,
        confirmed: true,
      },
      cookie,
    );
    const test = (await FieldTest.findOne({ where: { athleteId: athlete.id } }))!;
    // No test named: the message, and nothing undone.
    const saved = await snapshot();
    const unnamed = await run(
      tests.action,
      new Request(`${BASE}/athlete/tests`, {
        method: "POST",
        body: new URLSearchParams({ testId: "" }),
        headers: { Cookie: cookie, "Content-Type": "application/x-www-form-urlencoded" },
      }),
    );
    expect(statusOf(unnamed)).toBe(400);
    expect(messageOf(payloadOf(unnamed), "testId")).toBe("Choose a test to undo.");
    expect(await snapshot()).toEqual(saved);
    const res = await run(
      tests.action,
      new Request(`${BASE}/athlete/tests`, {
        method: "POST",
        body: new URLSearchParams({ testId: String(test.id) }),
        headers: { Cookie: cookie, "Content-Type": "application/x-www-form-urlencoded" },
      }),
    );
    expect(payloadOf(res).status).toBe("success");
    const after = await snapshot();
    // Every value is back; only the feed sequence moved on again (calendars must pick up the undo too).
    expect(after.map(({ feed_sequence: _s, ...r }) => r)).toEqual(before.map(({ feed_sequence: _s, ...r }) => r));
    expect(await Threshold.count({ where: { athleteId: athlete.id, source: "field_test" } })).toBe(0);
    expect(await RescaleReport.count({ where: { athleteId: athlete.id, kind: "undo" } })).toBe(1);
    await test.reload();
    expect(test.status).toBe("undone");
    const again = await run(
      tests.action,
      new Request(`${BASE}/athlete/tests`, {
        method: "POST",
        body: new URLSearchParams({ testId: String(test.id) }),
        headers: { Cookie: cookie, "Content-Type": "application/x-www-form-urlencoded" },
      }),
    );
    expect(statusOf(again)).toBe(400);
  });

  it("undo restores every step exactly, recomputing the ones that held the old numbers and copying only the rest", async () => {
    const { athlete, cookie } = await scenario();
    // Two in-scope steps that do not hold what 250 W gives them (one typed by hand, one never resolved), so the
    // rescale must keep copies of exactly these two; every other step is recomputed by the undo.
    const inScope = await ScheduledBlock.findAll({
      where: { athleteId: athlete.id, metric: "power", date: "2026-12-08" },
      order: [["position", "ASC"]],
    });
    await inScope[0].update({ lowAbs: 123, highAbs: 321 });
    await inScope[1].update({ lowAbs: null, highAbs: null, unit: null, thresholdId: null, thresholdValue: null });
    const everything = () =>
      db().query<Record<string, unknown>>(
        "SELECT b.*, s.status FROM scheduled_blocks b JOIN scheduled_sessions s ON s.id = b.scheduled_session_id ORDER BY b.id",
        { type: QueryTypes.SELECT },
      );
    const before = await everything();
    await save(
      {
        protocol: "twenty_minute",
        inputs: { meanW: "320" },
        testedOn: "2026-11-20",
        readiness: READY,
        confirmed: true,
      },
      cookie,
    );
    const report = (await RescaleReport.findOne({ where: { athleteId: athlete.id, kind: "apply" } }))!;
    const copied = await db().query<{ block_id: number }>(
      "SELECT block_id FROM rescale_undo_steps WHERE report_id = ? ORDER BY block_id",
      { replacements: [report.id], type: QueryTypes.SELECT },
    );
    expect(copied.map((c) => c.block_id)).toEqual([inScope[0].id, inScope[1].id].sort((a, b) => a - b));
    // The rescale did change them (304 W: 95 % of 320), so the undo below has something to restore.
    await inScope[0].reload();
    expect(inScope[0].thresholdValue).toBe(304);
    const test = (await FieldTest.findOne({ where: { athleteId: athlete.id } }))!;
    const res = await run(
      tests.action,
      new Request(`${BASE}/athlete/tests`, {
        method: "POST",
        body: new URLSearchParams({ testId: String(test.id) }),
        headers: { Cookie: cookie, "Content-Type": "application/x-www-form-urlencoded" },
      }),
    );
    expect(payloadOf(res).status).toBe("success");
    // Every column of every step, in scope or not (other metrics, earlier dates, done and skipped sessions, the
    // bystander's), is as it was before the rescale.
    expect(await everything()).toEqual(before);
    const undo = (await RescaleReport.findOne({ where: { athleteId: athlete.id, kind: "undo" } }))!;
    expect([undo.sessionsChanged, undo.blocksChanged]).toEqual([report.sessionsChanged, report.blocksChanged]);
  });

  it("a fault mid-transaction leaves everything as it was", async () => {
    const { athlete, cookie } = await scenario();
    const before = await snapshot();
    const counts = async () => [
      await FieldTest.count(),
      await Threshold.count(),
      await RescaleReport.count(),
      await OutboundEmail.count(),
    ];
    const c0 = await counts();
    // Fault injection in the database itself: the sessions update (after blocks were rewritten) aborts.
    const removeFault = await injectUpdateFault(
      "fault_injection",
      "scheduled_sessions",
      "feed_sequence",
      `NEW.athlete_id = ${athlete.id}`,
      "injected fault",
    );
    try {
      await expect(
        save(
          {
            protocol: "twenty_minute",
            inputs: { meanW: "310" },
            testedOn: "2026-11-20",
            readiness: READY,
            confirmed: true,
          },
          cookie,
        ),
      ).rejects.toThrow();
    } finally {
      await removeFault();
    }
    expect(await snapshot()).toEqual(before);
    expect(await counts()).toEqual(c0);
  });

  it("a double submit (same request key) rescales once", async () => {
    const { athlete, cookie } = await scenario();
    const body = {
      protocol: "twenty_minute",
      inputs: { meanW: "280" },
      testedOn: "2026-11-20",
      readiness: READY,
      requestKey: "double-submit-key",
    };
    const [a, b] = await Promise.all([save(body, cookie), save(body, cookie)]);
    expect([statusOf(a), statusOf(b)]).toEqual([302, 302]);
    expect(await FieldTest.count({ where: { athleteId: athlete.id } })).toBe(1);
    expect(await RescaleReport.count({ where: { athleteId: athlete.id } })).toBe(1);
    const work = await ScheduledBlock.findOne({ where: { athleteId: athlete.id, part: "work", date: "2026-12-08" } });
    expect(work!.thresholdValue).toBe(266);
  });

  it("refuses a maximal test without readiness, a future date, impossible results; preview changes nothing", async () => {
    const { athlete, cookie } = await scenario();
    const before = await snapshot();
    const noReady = await save({ protocol: "twenty_minute", inputs: { meanW: "300" }, testedOn: "2026-11-20" }, cookie);
    expect(statusOf(noReady)).toBe(400);
    expect(saveMessage(noReady)).toMatch(/readiness|Answer every/);
    expect(
      statusOf(
        await save(
          { protocol: "twenty_minute", inputs: { meanW: "300" }, testedOn: "2027-06-01", readiness: READY },
          cookie,
        ),
      ),
    ).toBe(400);
    expect(
      saveMessage(
        await save(
          { protocol: "swim_pair", inputs: { t400: "2:00", t200: "2:50" }, testedOn: "2026-11-20", readiness: READY },
          cookie,
        ),
      ),
    ).toMatch(/longer than the 200/);
    expect(
      saveMessage(
        await save(
          { protocol: "twenty_minute", inputs: { meanW: "-4" }, testedOn: "2026-11-20", readiness: READY },
          cookie,
        ),
      ),
    ).toMatch(/must be 50–700 W/);

    const p = (await run(
      preview.action,
      new Request(`${BASE}/api/tests/preview`, {
        method: "POST",
        body: JSON.stringify({ protocol: "twenty_minute", inputs: { meanW: "300" }, testedOn: "2026-11-20" }),
        headers: { "Content-Type": "application/json", Cookie: cookie },
      }),
    )) as Response;
    const body = await p.json();
    expect(body.proposed).toMatchObject({ value: 285, label: "285 W" });
    expect(body.current).toMatchObject({ label: "250 W" });
    expect(body.changes).toMatchObject({ sessions: 3 });
    expect(body.examples[0]).toMatchObject({ before: "243–258 W", after: "276–294 W" });
    expect(await snapshot()).toEqual(before);
    expect(await FieldTest.count({ where: { athleteId: athlete.id } })).toBe(0);
  });

  it("a coach logs a test for their own athlete; another coach gets 404", async () => {
    const { athlete, coachCookie } = await scenario();
    const res = await save(
      { protocol: "manual", inputs: { sport: "bike", metric: "power", value: "270" }, testedOn: "2026-11-25" },
      coachCookie,
      athlete.id,
    );
    expect((res as Response).headers.get("location")).toBe(`/coach/athletes/${athlete.id}/tests`);
    expect(await FieldTest.count({ where: { athleteId: athlete.id } })).toBe(1);
    expect((await toastOf(res as Response))?.message).toMatch(/^Saved\. Bike power is now 270 W/);
    const stranger = await makeUser({ role: "coach" });
    expect(
      statusOf(
        await save(
          { protocol: "manual", inputs: { sport: "bike", metric: "power", value: "999" }, testedOn: "2026-11-25" },
          await signIn(stranger.email),
          athlete.id,
        ),
      ),
    ).toBe(404);
    expect(
      statusOf(
        await run(tests.loader, getRequest(`/coach/athletes/${athlete.id}/tests`, await signIn(stranger.email)), {
          athleteId: String(athlete.id),
        }),
      ),
    ).toBe(404);
  });
});

describe("ride-file uploads", () => {
  const send = (cookie: string, name: string, content: BlobPart, headers: Record<string, string> = {}) => {
    const body = new FormData();
    body.append("file", new File([content], name));
    return run(
      uploads.action,
      new Request(`${BASE}/api/uploads`, { method: "POST", body, headers: { Cookie: cookie, ...headers } }),
    ) as Promise<Response>;
  };
  const stored = () => {
    const dir = process.env.UPLOAD_DIR!;
    return fs.existsSync(dir)
      ? fs.readdirSync(dir, { recursive: true }).filter((f) => fs.statSync(path.join(dir, String(f))).isFile()).length
      : 0;
  };

  it("reads a 20-minute test file, finds the effort, and saving it rescales", async () => {
    const { athlete, cookie } = await scenario();
    const res = await send(cookie, "twenty.fit", toFit(twentyMinuteTestRide(300)) as BlobPart);
    expect(res.status).toBe(201);
    const { upload, trace } = await res.json();
    expect(upload.summary.efforts["20min"].mean).toBeCloseTo(300, 0);
    expect(trace.length).toBeGreaterThan(100);
    const p = await (
      (await run(
        preview.action,
        new Request(`${BASE}/api/tests/preview`, {
          method: "POST",
          body: JSON.stringify({ protocol: "twenty_minute", uploadId: upload.id, testedOn: "2026-11-20" }),
          headers: { "Content-Type": "application/json", Cookie: cookie },
        }),
      )) as Response
    ).json();
    expect(p.proposed.value).toBe(285);
    expect(p.window).toEqual({ startS: 1440, lengthS: 1200 });
    expect(p.pacing.verdict).toBe("even");
    // Shifting the window by hand changes the proposal.
    const shifted = await (
      (await run(
        preview.action,
        new Request(`${BASE}/api/tests/preview`, {
          method: "POST",
          body: JSON.stringify({
            protocol: "twenty_minute",
            uploadId: upload.id,
            windowStartS: 1500,
            testedOn: "2026-11-20",
          }),
          headers: { "Content-Type": "application/json", Cookie: cookie },
        }),
      )) as Response
    ).json();
    expect(shifted.proposed.value).toBeLessThan(285);
    const saved = await save(
      { protocol: "twenty_minute", uploadId: upload.id, testedOn: "2026-11-20", readiness: READY, confirmed: true },
      cookie,
    );
    expect(statusOf(saved)).toBe(302);
    expect((await FieldTest.findOne({ where: { athleteId: athlete.id } }))!.uploadId).toBe(upload.id);
  });

  it("refuses bad files with a reason and keeps nothing", async () => {
    const { athlete, cookie } = await scenario();
    const before = { rows: await Upload.count(), files: stored() };
    const fit = toFit(twentyMinuteTestRide(250));
    const cases: [string, BlobPart, number, RegExp][] = [
      ["empty.csv", "", 400, /empty|Choose a file/],
      ["garbage.fit", new Uint8Array(64).map((_, i) => (i * 37) % 256), 400, /not a FIT file/],
      ["notes.csv", "date,notes\n2026-01-01,easy\n", 400, /No power, heart-rate/],
      ["broken.gpx", "<gpx><trk><trkseg><trkpt lat='1'", 400, /cannot be used/],
      ["cut.fit", fit.slice(0, fit.length / 2) as BlobPart, 400, /cut short|could not be read/],
      ["ride.exe", "MZ....", 415, /not accepted/],
    ];
    for (const [name, content, status, message] of cases) {
      const res = await send(cookie, name, content);
      expect(res.status, name).toBe(status);
      expect((await res.json()).error, name).toMatch(message);
    }
    const big = await send(cookie, "big.csv", new Uint8Array(26 * 1024 * 1024));
    expect(big.status).toBe(413);
    const notMultipart = (await run(
      uploads.action,
      new Request(`${BASE}/api/uploads`, {
        method: "POST",
        body: "x",
        headers: { Cookie: cookie, "Content-Type": "text/plain" },
      }),
    )) as Response;
    expect(notMultipart.status).toBe(415);
    expect({ rows: await Upload.count(), files: stored() }).toEqual(before);

    // A heart-rate-only file uploads, but a power test cannot use it, and nothing changes.
    const hrOnly = await send(
      cookie,
      "hr.csv",
      "time,heart_rate\n" + Array.from({ length: 1500 }, (_, i) => `${i},150`).join("\n"),
    );
    expect(hrOnly.status).toBe(201);
    const { upload } = await hrOnly.json();
    const snap = await snapshot();
    const res = await save(
      { protocol: "twenty_minute", uploadId: upload.id, testedOn: "2026-11-20", readiness: READY },
      cookie,
    );
    expect(statusOf(res)).toBe(400);
    expect(saveMessage(res)).toMatch(/no power/);
    expect(await snapshot()).toEqual(snap);
    expect(await FieldTest.count({ where: { athleteId: athlete.id } })).toBe(0);
  });

  it("keeps each athlete's uploads to themselves", async () => {
    const { cookie } = await scenario();
    const res = await send(cookie, "ride.gpx", toGpx(twentyMinuteTestRide(250).slice(0, 600)));
    const { upload } = await res.json();
    const other = await makeUser({ role: "athlete" });
    const oc = await signIn(other.email);
    expect(((await run(uploads.loader, getRequest(`/api/uploads?id=${upload.id}`, oc))) as Response).status).toBe(404);
    const listed = await ((await run(uploads.loader, getRequest(`/api/uploads`, oc))) as Response).json();
    expect(listed.uploads).toEqual([]);
    expect(toCsv([]).startsWith("time")).toBe(true);
  });
});
