import { describe, expect, it } from "vitest";
import { CoachAthlete, ScheduledBlock, ScheduledSession, Threshold } from "~/.server/models";
import { loadSeries } from "~/.server/services/load";
import { attachRide } from "~/.server/services/ride-attach";
import * as loadApi from "~/routes/api/athlete-load";
import * as loadPage from "~/routes/athlete/load";
import * as roster from "~/routes/coach/roster";
import * as uploads from "~/routes/api/uploads";
import { addDays, todayIn } from "~/lib/dates";
import { acuteChronicRatio, fitnessFatigue, monotonyStrain, trimpBanister } from "~/lib/training";
import { enduranceRide, twentyMinuteTestRide, toCsv } from "../../db/demo/rides";
import { getRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

const BASE = "http://localhost:3999";

/** Fixed fixture: 40 days of done sessions with hand-chosen scores, and planned sessions for the next 10 days. */
async function fixture() {
  const coach = await makeUser({ role: "coach" });
  const athlete = await makeUser({ role: "athlete" });
  await CoachAthlete.create({ coachId: coach.id, athleteId: athlete.id });
  const today = todayIn("UTC");
  const done: number[] = [];
  for (let i = 39; i >= 0; i--) {
    const date = addDays(today, -i);
    if (i % 7 === 3) {
      done.push(0);
      continue;
    }
    const score = [3, 5, 7, 4, 6, 2][i % 6];
    const minutes = 40 + (i % 4) * 15;
    done.push(score * minutes);
    await ScheduledSession.create({
      athleteId: athlete.id,
      date,
      name: "Done",
      sport: "bike",
      status: "done",
      effortScore: score,
      actualMinutes: minutes,
      plannedDurationS: minutes * 60,
      plannedLoad: 300,
    });
  }
  for (let i = 1; i <= 10; i++)
    await ScheduledSession.create({
      athleteId: athlete.id,
      date: addDays(today, i),
      name: "Planned",
      sport: "bike",
      status: "planned",
      plannedDurationS: 3600,
      plannedLoad: 250 + i,
    });
  // A cancelled session never counts.
  await ScheduledSession.create({
    athleteId: athlete.id,
    date: today,
    name: "Gone",
    sport: "bike",
    status: "cancelled",
    effortScore: 10,
    actualMinutes: 600,
    plannedDurationS: 3600,
    plannedLoad: 999,
  });
  return { coach, athlete, today, done };
}

describe("training load", () => {
  it("daily series are the engine's functions applied to the stored sessions, with planned load beyond today", async () => {
    const { athlete, today, done } = await fixture();
    const from = addDays(today, -39);
    const to = addDays(today, 10);
    const s = await loadSeries(athlete, from, to);
    expect(s.daily).toHaveLength(50);
    expect(s.daily.slice(0, 40).map((d) => d.effortLoad)).toEqual(done);
    expect(s.daily.slice(40).map((d) => d.plannedLoad)).toEqual(Array.from({ length: 10 }, (_, i) => 251 + i));
    expect(s.daily.slice(40).every((d) => d.future)).toBe(true);
    // The model starts 84 days before `from` with nothing there, so it equals the engine over zeros + done + planned.
    const model = [...new Array(84).fill(0), ...done, ...Array.from({ length: 10 }, (_, i) => 251 + i)];
    const ff = fitnessFatigue(model).slice(84);
    s.daily.forEach((d, i) => {
      expect(d.fitness).toBeCloseTo(ff[i].fitness, 1);
      expect(d.fatigue).toBeCloseTo(ff[i].fatigue, 1);
    });
    const acwr = acuteChronicRatio(model).slice(84);
    expect(s.daily[39].acwrRolling).toBeCloseTo(acwr[39]!, 2);
    // Hand check of one value: on the last done day the fatigue (τ = 7) is above the fitness (τ = 42) after a build-up from zero.
    expect(s.daily[39].fatigue).toBeGreaterThan(s.daily[39].fitness);
    // Weekly monotony is Foster's, over the loads of that week's days.
    const full = s.weekly.find((w) => w.week >= from && addDays(w.week, 6) <= today)!;
    const start = s.daily.findIndex((d) => d.date === full.week);
    expect(start).toBeGreaterThanOrEqual(0);
    const ms = monotonyStrain(s.daily.slice(start, start + 7).map((d) => d.effortLoad));
    expect(full.monotony).toBeCloseTo(ms.monotony!, 2);
    expect(full.strain).toBeCloseTo(ms.strain!, 0);
  });

  it("serves JSON and CSV to the athlete and their coach, 404 to anyone else", async () => {
    const { coach, athlete, today } = await fixture();
    const from = addDays(today, -13);
    const q = `from=${from}&to=${addDays(today, 7)}`;
    const mine = (await run(
      loadApi.loader,
      getRequest(`/api/athletes/${athlete.id}/load?${q}`, await signIn(athlete.email)),
      { id: String(athlete.id) },
    )) as Response;
    expect(mine.status).toBe(200);
    expect((await mine.json()).daily).toHaveLength(21);
    const csv = (await run(
      loadApi.loader,
      getRequest(`/api/athletes/${athlete.id}/load?${q}&format=csv`, await signIn(coach.email)),
      { id: String(athlete.id) },
    )) as Response;
    expect(csv.headers.get("content-type")).toMatch(/text\/csv/);
    const lines = (await csv.text()).trim().split("\n");
    expect(lines[0]).toMatch(/^date,done_load,of_which_power_load,planned_load,trimp,work_kj,fitness,fatigue,balance/);
    expect(lines).toHaveLength(22);
    const other = await makeUser({ role: "athlete" });
    expect(
      statusOf(
        await run(loadApi.loader, getRequest(`/api/athletes/${athlete.id}/load?${q}`, await signIn(other.email)), {
          id: String(athlete.id),
        }),
      ),
    ).toBe(404);
    const otherCoach = await makeUser({ role: "coach" });
    expect(
      statusOf(
        await run(loadApi.loader, getRequest(`/api/athletes/${athlete.id}/load?${q}`, await signIn(otherCoach.email)), {
          id: String(athlete.id),
        }),
      ),
    ).toBe(404);
    const bad = (await run(
      loadApi.loader,
      getRequest(`/api/athletes/${athlete.id}/load?from=2027-99-01&to=x`, await signIn(athlete.email)),
      { id: String(athlete.id) },
    )) as Response;
    expect(bad.status).toBe(400);
  });

  it("the roster shows compliance for the last four weeks and flags a load spike", async () => {
    const { coach, athlete, today } = await fixture();
    // Pile load on the last week: a spike against the four-week average.
    for (let i = 0; i < 6; i++)
      await ScheduledSession.create({
        athleteId: athlete.id,
        date: addDays(today, -i),
        name: "Huge",
        sport: "bike",
        status: "done",
        effortScore: 9,
        actualMinutes: 180,
      });
    const list = payloadOf(await run(roster.loader, getRequest("/coach", await signIn(coach.email))));
    const row = list.athletes.find((a: { id: number }) => a.id === athlete.id);
    expect(row.load.compliance).toBeGreaterThan(0.8);
    expect(row.load.spike).toBe(true);
  });

  it("a ride file attached to a day is matched to the planned session, with work and TRIMP stored", async () => {
    const athlete = await makeUser({ role: "athlete" });
    await athlete.update({ restingHr: 48, maxHr: 188, sex: "male" });
    await Threshold.create({
      athleteId: athlete.id,
      sport: "bike",
      metric: "power",
      value: 280,
      unit: "W",
      effectiveFrom: "2026-01-01",
      source: "manual",
    });
    const planned = await ScheduledSession.create({
      athleteId: athlete.id,
      date: "2026-11-20",
      name: "Planned ride",
      sport: "bike",
      plannedDurationS: 3600,
      plannedLoad: 300,
    });
    // One step: an hour at 140–160 W (the demo ride's warm-up sits near 150 W, its test near 290 W).
    await ScheduledBlock.create({
      scheduledSessionId: planned.id,
      athleteId: athlete.id,
      date: "2026-11-20",
      sport: "bike",
      position: 0,
      blockIndex: 0,
      kind: "steady",
      part: "main",
      rep: null,
      repCount: null,
      durationS: 3600,
      metric: "power",
      lowPct: 50,
      highPct: 57,
      ramp: false,
      lowAbs: 140,
      highAbs: 160,
      unit: "W",
      thresholdId: null,
      thresholdValue: 280,
      cue: null,
      cadence: null,
    });
    const body = new FormData();
    const ride = twentyMinuteTestRide(290);
    body.append("file", new File([toCsv(ride)], "ride.csv"));
    const cookie = await signIn(athlete.email);
    const up = await (
      (await run(
        uploads.action,
        new Request(`${BASE}/api/uploads`, { method: "POST", body, headers: { Cookie: cookie } }),
      )) as Response
    ).json();
    const r = await attachRide(athlete, up.upload.id, "2026-11-20", 8);
    expect(r.matched).toBe(true);
    await planned.reload();
    expect(planned.status).toBe("done");
    expect(planned.workKj).toBeCloseTo(ride.reduce((s, x) => s + x.power, 0) / 1000, 6);
    const hr = ride.map((x) => x.hr);
    expect(planned.trimp).toBeCloseTo(
      trimpBanister({
        minutes: hr.length / 60,
        avgHr: hr.reduce((a, b) => a + b, 0) / hr.length,
        restHr: 48,
        maxHr: 188,
        sex: "male",
      }),
      6,
    );
    const expected = ride.filter((x) => x.power >= 140 - 7.5 && x.power <= 160 + 7.5).length;
    expect(planned).toMatchObject({ targetedS: 3600, inTargetS: expected });
    const zones = JSON.parse(planned.zoneMinutes!) as number[];
    expect(zones.reduce((a, b) => a + b, 0)).toBeCloseTo(ride.filter((x) => x.power > 0).length / 60, 6);
    const again = await attachRide(athlete, up.upload.id, "2026-11-20", 6);
    expect(again.matched).toBe(false);
    expect(again.session.name).toBe("Unplanned ride");
  });
  it("a power-only ride without an effort score counts its band load in the load series", async () => {
    const athlete = await makeUser({ role: "athlete" });
    await Threshold.create({
      athleteId: athlete.id,
      sport: "bike",
      metric: "power",
      value: 250,
      unit: "W",
      effectiveFrom: "2026-01-01",
      source: "manual",
    });
    const today = todayIn(athlete.timezone);
    const day = addDays(today, -3);
    // Power only: no heart-rate column, so no TRIMP; no effort score typed.
    const ride = enduranceRide(180);
    const csv = ["time,power", ...ride.map((x) => `${x.t},${x.power}`)].join("\n") + "\n";
    const body = new FormData();
    body.append("file", new File([csv], "power-only.csv"));
    const cookie = await signIn(athlete.email);
    const up = await (
      (await run(
        uploads.action,
        new Request(`${BASE}/api/uploads`, { method: "POST", body, headers: { Cookie: cookie } }),
      )) as Response
    ).json();
    const { session } = await attachRide(athlete, up.upload.id, day, null);
    await session.reload();
    expect(session.trimp).toBeNull();

    // Worked by hand from the samples: Edwards' zone weighting (Edwards 1993, minutes per zone × 1…5) applied to the
    // default power bands, whose lower edges are 0, 60, 80, 95, 105 and 130 % of threshold, weights 1…6.
    const edges = [0, 60, 80, 95, 105, 130].map((p) => (p / 100) * 250);
    let expected = 0;
    for (const x of ride) {
      if (x.power <= 0) continue;
      let band = 0;
      while (band + 1 < edges.length && x.power >= edges[band + 1]) band++;
      expected += (band + 1) / 60;
    }
    expect(session.bandLoad).toBeCloseTo(expected, 1);

    const series = await loadSeries(athlete, addDays(today, -13), today);
    const d = series.daily.find((x) => x.date === day)!;
    expect(d.effortLoad).toBeCloseTo(expected, 0);
    expect(d.powerLoad).toBeCloseTo(expected, 0);
    const week = series.weekly.find((w) => w.week <= day && day < addDays(w.week, 7))!;
    expect(week.powerLoad).toBeCloseTo(expected, 0);

    // Once an effort score is given, the effort load (Foster 2001: score × minutes) takes over and power stands aside.
    await session.update({ effortScore: 4 });
    const scored = (await loadSeries(athlete, addDays(today, -13), today)).daily.find((x) => x.date === day)!;
    expect(scored.effortLoad).toBeCloseTo(4 * (ride.length / 60), 0);
    expect(scored.powerLoad).toBe(0);
  });
  it("the load page reads its period from the URL; an unknown range falls back to three months", async () => {
    const { athlete, today } = await fixture();
    const cookie = await signIn(athlete.email);
    const six = payloadOf(await run(loadPage.loader, getRequest("/athlete/load?range=6w", cookie)));
    expect(six.range).toBe("6w");
    expect(six.data.from).toBe(addDays(today, -41));
    const odd = payloadOf(await run(loadPage.loader, getRequest("/athlete/load?range=forever", cookie)));
    expect(odd.range).toBe("3m");
    expect(odd.data.from).toBe(addDays(today, -89));
  });
});
