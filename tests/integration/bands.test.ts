import { describe, expect, it } from "vitest";
import { BandSetRow, CoachAthlete, ScheduledBlock, ScheduledSession, Threshold, Upload } from "~/.server/models";
import { buildFeed } from "~/.server/services/feed-calendar";
import { thresholdBandsText } from "~/.server/services/bands";
import { renderEmail } from "~/.server/mail";
import { loadSeries } from "~/.server/services/load";
import * as bandsPage from "~/routes/coach/bands";
import * as sessionPage from "~/routes/athlete/session";
import * as uploads from "~/routes/api/uploads";
import * as loadApi from "~/routes/api/athlete-load";
import { addDays, todayIn } from "~/lib/dates";
import { bandOfValue, defaultBandSet, minutesPerBand, valueHistogram } from "~/lib/training";
import { twentyMinuteTestRide, toCsv } from "../../db/demo/rides";
import { BASE, fieldErrorsOf, formRequest, getRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

/** A coach with one athlete (250 W threshold) and a session tomorrow: warm-up at 55–65 %, 3 × 10 min at 88–92 %. */
async function coachedAthlete() {
  const coach = await makeUser({ role: "coach" });
  const athlete = await makeUser({ role: "athlete", timezone: "UTC" });
  await CoachAthlete.create({ coachId: coach.id, athleteId: athlete.id });
  await Threshold.create({
    athleteId: athlete.id,
    sport: "bike",
    metric: "power",
    value: 250,
    unit: "W",
    effectiveFrom: "2026-01-01",
    source: "manual",
  });
  const date = addDays(todayIn("UTC"), 1);
  const s = await ScheduledSession.create({
    athleteId: athlete.id,
    date,
    name: "Sweet work",
    sport: "bike",
    plannedDurationS: 2400,
    plannedLoad: 200,
  });
  const block = (
    position: number,
    blockIndex: number,
    kind: string,
    part: string,
    durationS: number,
    lowPct: number,
    highPct: number,
  ) =>
    ScheduledBlock.create({
      scheduledSessionId: s.id,
      athleteId: athlete.id,
      date,
      sport: "bike",
      position,
      blockIndex,
      kind,
      part,
      rep: null,
      repCount: kind === "repeats" ? 3 : null,
      durationS,
      metric: "power",
      lowPct,
      highPct,
      ramp: false,
      lowAbs: Math.round((lowPct * 250) / 100),
      highAbs: Math.round((highPct * 250) / 100),
      unit: "W",
      thresholdId: null,
      thresholdValue: 250,
      cue: null,
      cadence: null,
    });
  await block(0, 0, "warmup", "main", 600, 55, 65);
  for (let r = 0; r < 3; r++) await block(1 + r, 1, "repeats", "work", 600, 88, 92);
  return { coach, athlete, session: s };
}

const form = (set: string, rows: [string, string, string, string][], intent = "save") => {
  const f: Record<string, string> = { set, intent };
  rows.forEach((r, i) =>
    (["name", "fromPct", "toPct", "meaning"] as const).forEach((k, j) => (f[`bands[${i}].${k}`] = r[j])),
  );
  return f;
};

const mine: [string, string, string, string][] = [
  ["Gentle", "0", "70", "Very easy."],
  ["Working", "70", "89", "Aerobic work."],
  ["Pressing", "89", "100", "Close to threshold."],
  ["Over", "100", "", "Above threshold."],
];

describe("coach-edited band sets", () => {
  it("a coach edits a set: their athlete's session page and feed follow; another coach's athlete keeps the defaults", async () => {
    const a = await coachedAthlete();
    const b = await coachedAthlete();
    const coachCookie = await signIn(a.coach.email);

    const before = payloadOf(
      await run(sessionPage.loader, getRequest(`/athlete/sessions/${a.session.id}`, await signIn(a.athlete.email)), {
        id: String(a.session.id),
      }),
    );
    expect(before.bandsByBlock.map((x: { name: string }) => x.name)).toEqual(["Steady", "Heavy"]);

    const saved = await run(
      bandsPage.action,
      formRequest("/coach/bands", form("bike:power", mine), { cookie: coachCookie }),
    );
    expect(payloadOf(saved).status).toBe("success");

    const page = payloadOf(
      await run(sessionPage.loader, getRequest(`/athlete/sessions/${a.session.id}`, await signIn(a.athlete.email)), {
        id: String(a.session.id),
      }),
    );
    // Warm-up mid 60 % → Gentle; repeats mid 90 % → Pressing (89 belongs to Pressing: [from, to)).
    expect(page.bandsByBlock.map((x: { name: string }) => x.name)).toEqual(["Gentle", "Pressing"]);
    const table = page.zones.find((z: { metric: string }) => z.metric === "power");
    expect(table.isDefault).toBe(false);
    expect(table.rows.map((r: { name: string; range: string }) => `${r.name} ${r.range}`)).toEqual([
      "Gentle up to 174 W",
      "Working 175 W – 222 W",
      "Pressing 223 W – 249 W",
      "Over 250 W and above",
    ]);

    const feedA = (await buildFeed(a.athlete)).body.replace(/\r\n /g, "");
    expect(feedA).toContain("Pressing band");
    expect(feedA).not.toContain("Heavy band");

    // The new-threshold e-mail lists the coach's bands for the new number.
    const text = await thresholdBandsText(a.athlete, "bike", "power", 250, "W");
    expect(text).toContain("Pressing: 223 W – 249 W");
    const mail = await renderEmail("rescale-summary", {
      recipientName: "A",
      athleteName: "B",
      testLabel: "20-minute test",
      testedOn: "2026-11-20",
      metricLabel: "power",
      newValue: "250 W",
      oldValue: "240 W",
      sessionsChanged: 1,
      blocksChanged: 2,
      examples: "",
      guardNote: "",
      bands: text,
      link: "http://x",
    });
    expect(mail.text).toContain("Over: 250 W and above");
    expect(await thresholdBandsText(b.athlete, "bike", "power", 250, "W")).toContain("Heavy: 200 W – 237 W");

    // The other coach's athlete still reads Pacewright's defaults everywhere.
    const other = payloadOf(
      await run(sessionPage.loader, getRequest(`/athlete/sessions/${b.session.id}`, await signIn(b.athlete.email)), {
        id: String(b.session.id),
      }),
    );
    expect(other.bandsByBlock.map((x: { name: string }) => x.name)).toEqual(["Steady", "Heavy"]);
    expect(other.zones[0].isDefault).toBe(true);
    const feedB = (await buildFeed(b.athlete)).body.replace(/\r\n /g, "");
    expect(feedB).toContain("Heavy band");
    expect(feedB).not.toContain("Pressing");

    // The other coach's settings page shows the defaults, not A's edit.
    const otherSettings = payloadOf(
      await run(bandsPage.loader, getRequest("/coach/bands?set=bike:power", await signIn(b.coach.email))),
    );
    expect(otherSettings.set.bands[0].name).toBe("Easy");

    // Restore defaults: the athlete is back on the defaults.
    expect(
      payloadOf(
        await run(
          bandsPage.action,
          formRequest("/coach/bands", { set: "bike:power", intent: "restore" }, { cookie: coachCookie }),
        ),
      ),
    ).toMatchObject({ status: "success", message: "Back to Pacewright's default bands." });
    const restored = payloadOf(
      await run(sessionPage.loader, getRequest(`/athlete/sessions/${a.session.id}`, await signIn(a.athlete.email)), {
        id: String(a.session.id),
      }),
    );
    expect(restored.bandsByBlock.map((x: { name: string }) => x.name)).toEqual(["Steady", "Heavy"]);
    expect(await BandSetRow.count({ where: { coachId: a.coach.id } })).toBe(0);
  });

  it("bad input is refused with a message beside the field and saves nothing", async () => {
    const { coach } = await coachedAthlete();
    const cookie = await signIn(coach.email);
    const cases: [string, [string, string, string, string][], RegExp, number, string][] = [
      [
        "gap",
        [
          ["A one", "0", "70", ""],
          ["B two", "75", "100", ""],
          ["C three", "100", "", ""],
        ],
        /Gap/,
        1,
        "fromPct",
      ],
      [
        "overlap",
        [
          ["A one", "0", "70", ""],
          ["B two", "60", "100", ""],
          ["C three", "100", "", ""],
        ],
        /Overlap/,
        1,
        "fromPct",
      ],
      [
        "text",
        [
          ["A one", "0", "lots", ""],
          ["B two", "70", "100", ""],
          ["C three", "100", "", ""],
        ],
        /whole number/,
        0,
        "toPct",
      ],
      [
        "empty name",
        [
          ["A one", "0", "70", ""],
          ["  ", "70", "100", ""],
          ["C three", "100", "", ""],
        ],
        /name/,
        1,
        "name",
      ],
    ];
    for (const [label, rows, message, row, field] of cases) {
      const res = await run(bandsPage.action, formRequest("/coach/bands", form("bike:power", rows), { cookie }));
      expect(statusOf(res), label).toBe(400);
      expect(fieldErrorsOf(res)[`bands[${row}].${field}`], label).toMatch(message);
      expect(payloadOf(res).initialValue.bands).toHaveLength(rows.length);
    }
    const nine = Array.from(
      { length: 9 },
      (_, i) =>
        [`Band ${"abcdefghi"[i]}`, String(i * 20), i === 8 ? "" : String(i * 20 + 20), ""] as [
          string,
          string,
          string,
          string,
        ],
    );
    const res = await run(bandsPage.action, formRequest("/coach/bands", form("bike:power", nine), { cookie }));
    expect(statusOf(res)).toBe(400);
    expect(fieldErrorsOf(res).form).toMatch(/at most 8/);
    expect(await BandSetRow.count({ where: { coachId: coach.id } })).toBe(0);
    // Athletes cannot edit bands at all.
    const athlete = await makeUser({ role: "athlete" });
    const denied = await run(
      bandsPage.action,
      formRequest("/coach/bands", form("bike:power", mine), { cookie: await signIn(athlete.email) }),
    );
    expect([302, 403, 404]).toContain(statusOf(denied));
  });
});

describe("minutes per band from ride files", () => {
  it("a power file uploaded on the ride files page (not attached to a session) fills the weekly minutes-per-band chart", async () => {
    // The defect: minutes per level were only counted for files attached to a session, so uploads stayed invisible.
    const { athlete } = await coachedAthlete();
    const ride = twentyMinuteTestRide(290);
    const body = new FormData();
    body.append("file", new File([toCsv(ride)], "ride.csv"));
    const cookie = await signIn(athlete.email);
    const up = await (
      (await run(
        uploads.action,
        new Request(`${BASE}/api/uploads`, { method: "POST", body, headers: { Cookie: cookie } }),
      )) as Response
    ).json();
    expect(up.upload.id).toBeGreaterThan(0);
    const today = todayIn("UTC");
    const series = await loadSeries(athlete, addDays(today, -20), addDays(today, 7));
    const total = series.weekly.reduce((s, w) => s + w.bandMinutes.reduce((a, b) => a + b, 0), 0);
    const powered = ride.filter((x) => x.power > 0).length / 60;
    expect(total).toBeCloseTo(powered, 0);
    // Per band it is the engine's classification of each second against 250 W.
    const expected = minutesPerBand(valueHistogram(ride.map((x) => x.power)), 250, defaultBandSet("bike:power"));
    const week = series.weekly.find((w) => w.bandMinutes.some((m) => m > 0))!;
    week.bandMinutes.forEach((m, i) => expect(m).toBeCloseTo(expected[i], 0));
    expect(series.bands.map((b) => b.name)).toEqual(defaultBandSet("bike:power").bands.map((b) => b.name));
    // A second above threshold counts in a band at or above it.
    expect(bandOfValue(290, 250, defaultBandSet("bike:power")).name).toBe("Severe");

    // Files stored before histograms were kept are read once and counted too.
    const u = await Upload.findByPk(up.upload.id);
    const { histograms: _drop, ...old } = u!.summary as Record<string, unknown>;
    await u!.update({ summary: old });
    const again = await loadSeries(athlete, addDays(today, -20), addDays(today, 7));
    expect(again.weekly.reduce((s, w) => s + w.bandMinutes.reduce((a, b) => a + b, 0), 0)).toBeCloseTo(powered, 0);
    expect(((await Upload.findByPk(up.upload.id))!.summary as { histograms?: unknown }).histograms).toBeTruthy();

    // The CSV export carries one column per band, named after the band.
    const csv = await (
      (await run(
        loadApi.loader,
        getRequest(`/api/athletes/${athlete.id}/load?from=${addDays(today, -6)}&to=${today}&format=csv`, cookie),
        { id: String(athlete.id) },
      )) as Response
    ).text();
    expect(csv.split("\n")[0]).toContain(
      "minutes_easy,minutes_steady,minutes_heavy,minutes_ridge,minutes_severe,minutes_extreme",
    );
    expect(csv).not.toMatch(/level|zone/i);
  });

  it("the session page shows time in band for an attached ride file, in the coach's bands", async () => {
    const { coach, athlete } = await coachedAthlete();
    const date = todayIn("UTC");
    const planned = await ScheduledSession.create({
      athleteId: athlete.id,
      date,
      name: "Today's ride",
      sport: "bike",
      plannedDurationS: 3600,
      plannedLoad: 300,
    });
    const ride = twentyMinuteTestRide(290);
    const body = new FormData();
    body.append("file", new File([toCsv(ride)], "ride.csv"));
    const cookie = await signIn(athlete.email);
    const up = await (
      (await run(
        uploads.action,
        new Request(`${BASE}/api/uploads`, { method: "POST", body, headers: { Cookie: cookie } }),
      )) as Response
    ).json();
    await run(
      sessionPage.action,
      formRequest(
        `/athlete/sessions/${planned.id}`,
        { intent: "attach", uploadId: String(up.upload.id), effortScore: "7" },
        { cookie },
      ),
      { id: String(planned.id) },
    );
    await run(
      bandsPage.action,
      formRequest("/coach/bands", form("bike:power", mine), { cookie: await signIn(coach.email) }),
    );
    const page = payloadOf(
      await run(sessionPage.loader, getRequest(`/athlete/sessions/${planned.id}`, cookie), { id: String(planned.id) }),
    );
    expect(page.timeInBand.map((r: { name: string }) => r.name)).toEqual(["Gentle", "Working", "Pressing", "Over"]);
    const coachBands = [
      { name: "Gentle", fromPct: 0, toPct: 70, meaning: "" },
      { name: "Working", fromPct: 70, toPct: 89, meaning: "" },
      { name: "Pressing", fromPct: 89, toPct: 100, meaning: "" },
      { name: "Over", fromPct: 100, toPct: null, meaning: "" },
    ];
    const expected = minutesPerBand(valueHistogram(ride.map((x) => x.power)), 250, {
      metric: "power",
      bands: coachBands,
    });
    page.timeInBand.forEach((r: { minutes: number }, i: number) => expect(r.minutes).toBeCloseTo(expected[i], 1));
    expect(page.timeInBand.reduce((a: number, r: { minutes: number }) => a + r.minutes, 0)).toBeCloseTo(
      ride.filter((x) => x.power > 0).length / 60,
      0,
    );
  });

  it("with less than 28 days of history the load page says so instead of showing a ratio", async () => {
    const athlete = await makeUser({ role: "athlete", timezone: "UTC" });
    const today = todayIn("UTC");
    for (let i = 0; i < 7; i++)
      await ScheduledSession.create({
        athleteId: athlete.id,
        date: addDays(today, -i),
        name: "First week",
        sport: "bike",
        status: "done",
        effortScore: 6,
        actualMinutes: 60,
      });
    const s = await loadSeries(athlete, addDays(today, -89), addDays(today, 28));
    expect(s.daily.every((d) => d.acwrRolling === null && d.acwrEwma === null)).toBe(true);
    expect(s.latestRatio).toBeNull();
    expect(s.historyDays).toBe(7);
    expect(s.readiness[0]).toMatch(/Not enough history/);
    expect(s.weekly.every((w) => w.usual === null)).toBe(true);
  });
});
