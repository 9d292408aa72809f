import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { CoachAthlete, FieldTest, Threshold, Upload } from "~/.server/models";
import * as uploads from "~/routes/api/uploads";
import * as rideApi from "~/routes/api/ride";
import * as ridePage from "~/routes/ride";
import { toFit, type RideSample } from "../../db/demo/rides";
import { BASE, formRequest, getRequest, makeUser, payloadOf, run, signIn, statusOf } from "./helpers";

/** 30 minutes: 10 at 150 W, 10 at 300 W, 10 at 120 W, heart rate rising in the hard part; three FIT lap messages. */
function ride(): RideSample[] {
  return Array.from({ length: 1800 }, (_, t) => {
    const power = t < 600 ? 150 : t < 1200 ? 300 : 120;
    const hr = t < 600 ? 120 : t < 1200 ? 140 + Math.floor((t - 600) / 30) : 130;
    return { t, power, hr, cadence: 90, speed: 9 };
  });
}

async function scenario() {
  const coach = await makeUser({ role: "coach" });
  const athlete = await makeUser({ role: "athlete" });
  await CoachAthlete.create({ coachId: coach.id, athleteId: athlete.id });
  await Threshold.create({
    athleteId: athlete.id,
    sport: "bike",
    metric: "power",
    value: 262,
    unit: "W",
    effectiveFrom: "2026-01-01",
    source: "manual",
  });
  const cookie = await signIn(athlete.email);
  const form = new FormData();
  form.append(
    "file",
    new File([toFit(ride(), new Date("2026-11-20T07:00:00Z"), [0, 600, 1200]) as BlobPart], "laps.fit"),
  );
  const res = (await run(
    uploads.action,
    new Request(`${BASE}/api/uploads`, { method: "POST", body: form, headers: { Cookie: cookie } }),
  )) as Response;
  expect(res.status).toBeLessThan(300);
  const upload = (await Upload.findOne({ where: { athleteId: athlete.id }, order: [["id", "DESC"]] }))!;
  return { coach, athlete, cookie, coachCookie: await signIn(coach.email), upload };
}

describe("ride analysis: laps from a FIT file, lap table, W′ balance, band load", () => {
  it("reads the FIT file's three lap messages into the lap table", async () => {
    const { cookie, upload } = await scenario();
    const page = payloadOf(
      await run(ridePage.loader, getRequest(`/athlete/uploads/${upload.id}`, cookie), { id: String(upload.id) }),
    );
    expect(page.laps.map((l: { startS: number; durationS: number }) => [l.startS, l.durationS])).toEqual([
      [0, 600],
      [600, 600],
      [1200, 600],
    ]);
    expect(page.laps.map((l: { meanPowerW: number }) => Math.round(l.meanPowerW))).toEqual([150, 300, 120]);
    expect(page.laps[1].peakPowerW).toBe(300);
    // Lap 2: first 30 s at 140 bpm, last 30 s at 140 + 19 → rise 19.
    expect(page.laps[1].hrRiseBpm).toBeCloseTo(19, 9);
    expect(page.wPrime).toBeNull();
    expect(page.load.value).toBeGreaterThan(0);
  });

  it("marked laps and typed effort scores are saved; bad splits change nothing", async () => {
    const { cookie, upload } = await scenario();
    const path = `/athlete/uploads/${upload.id}`;
    const params = { id: String(upload.id) };
    expect(
      payloadOf(
        await run(
          ridePage.action,
          formRequest(path, { splits: "5:00, 20:00", effort: ["3", "8", "2"] }, { cookie }),
          params,
        ),
      ).ok,
    ).toBe(true);
    const page = payloadOf(await run(ridePage.loader, getRequest(path, cookie), params));
    expect(page.laps.map((l: { startS: number }) => l.startS)).toEqual([0, 300, 1200]);
    expect(page.laps.map((l: { effortScore: number | null }) => l.effortScore)).toEqual([3, 8, 2]);
    const bad = await run(
      ridePage.action,
      formRequest(path, { splits: "5:00, 99:00", effort: [] }, { cookie }),
      params,
    );
    expect(statusOf(bad)).toBe(400);
    expect(payloadOf(bad).message).toMatch(/outside the ride/);
    expect(payloadOf(await run(ridePage.loader, getRequest(path, cookie), params)).laps).toHaveLength(3);
  });

  it("draws W′ balance once the athlete has a critical power and W′", async () => {
    const { athlete, cookie, upload } = await scenario();
    await FieldTest.create({
      athleteId: athlete.id,
      protocol: "critical_power",
      sport: "bike",
      metric: "power",
      inputs: {},
      derived: { cpW: 270, wPrimeJ: 20000 },
      value: 270,
      unit: "W",
      testedOn: "2026-11-01",
    });
    const page = payloadOf(
      await run(ridePage.loader, getRequest(`/athlete/uploads/${upload.id}`, cookie), { id: String(upload.id) }),
    );
    expect(page.wPrime).toMatchObject({ cpW: 270, wPrimeJ: 20000 });
    // 10 minutes 30 W above CP spends far less than W′ comes back in: the lowest point stays well above zero.
    expect(page.wPrime.minKj).toBeGreaterThan(5);
    expect(page.wPrime.minKj).toBeLessThan(20);
    expect(page.trace.some((p: { wbalKj: number | null }) => p.wbalKj !== null)).toBe(true);
  });
});

describe("the rider's own data: 1 Hz CSV, power curve CSV, JSON — owner and their coach only", () => {
  it("owner and coach get the files; another athlete or coach gets 404", async () => {
    const { cookie, coachCookie, upload } = await scenario();
    const params = { id: String(upload.id) };
    const csv = (await run(rideApi.loader, getRequest(`/api/rides/${upload.id}/ride.csv`, cookie), {
      ...params,
      file: "ride.csv",
    })) as Response;
    expect(csv.status).toBe(200);
    expect(csv.headers.get("content-disposition")).toContain("laps-1hz.csv");
    const rows = Papa.parse<string[]>((await csv.text()).trim()).data;
    expect(rows[0]).toEqual(["time_s", "power_w", "heart_rate_bpm", "cadence_rpm", "speed_mps", "distance_m"]);
    expect(rows).toHaveLength(1801);
    expect(rows[700].slice(0, 3)).toEqual(["699", "300", String(140 + Math.floor(99 / 30))]);

    const curve = (await run(rideApi.loader, getRequest(`/api/rides/${upload.id}/power-curve.csv`, coachCookie), {
      ...params,
      file: "power-curve.csv",
    })) as Response;
    expect(curve.status).toBe(200);
    const c = Papa.parse<string[]>((await curve.text()).trim()).data;
    expect(c[0]).toEqual(["window_s", "best_mean_power_w"]);
    expect(c.find((r) => r[0] === "600")![1]).toBe("300");

    const json = (await run(rideApi.loader, getRequest(`/api/rides/${upload.id}`, coachCookie), params)) as Response;
    const body = await json.json();
    expect(body.samples).toHaveLength(1800);
    expect(body.laps.laps).toHaveLength(3);

    for (const role of ["athlete", "coach"] as const) {
      const stranger = await makeUser({ role });
      const other = await run(
        rideApi.loader,
        getRequest(`/api/rides/${upload.id}`, await signIn(stranger.email)),
        params,
      );
      expect(statusOf(other)).toBe(404);
    }
    expect(
      statusOf(
        await run(rideApi.loader, getRequest(`/api/rides/${upload.id}/other.txt`, cookie), {
          ...params,
          file: "other.txt",
        }),
      ),
    ).toBe(404);
  });
});
