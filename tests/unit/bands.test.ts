import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  BAND_SET_KEYS,
  bandIndexOf,
  bandOf,
  bandOfValue,
  bandRows,
  bandSetFromStored,
  bandShade,
  defaultBandSet,
  minutesPerBand,
  valueHistogram,
  validateBandSet,
  type BandInputRow,
} from "~/lib/training";

/*
 * Sources for the default sets: intensity domains (moderate / heavy / severe / extreme) of Gaesser & Poole (1996)
 * Exerc Sport Sci Rev 24:35 and Jamnick et al. (2020) Sports Med 50:1729; the three-zone view of Seiler & Kjerland
 * (2006) Scand J Med Sci Sports 16:49. The boundary figures themselves are common practice (see bands.ts).
 * The convention under test: each band is [fromPct, toPct) — a value on a boundary belongs to the band above.
 */

const power = defaultBandSet("bike:power");
const bikeHr = defaultBandSet("bike:heart_rate");
const runHr = defaultBandSet("run:heart_rate");
const pace = defaultBandSet("run:pace");
const swim = defaultBandSet("swim:pace");

describe("default band sets", () => {
  it.each(BAND_SET_KEYS)("%s is contiguous, ordered, starts at 0 and is open at the top", (key) => {
    const set = defaultBandSet(key);
    expect(set.bands.length).toBeGreaterThanOrEqual(3);
    expect(set.bands.length).toBeLessThanOrEqual(8);
    expect(set.bands[0].fromPct).toBe(0);
    expect(set.bands.at(-1)!.toPct).toBeNull();
    set.bands.forEach((b, i) => {
      if (i > 0) expect(b.fromPct).toBe(set.bands[i - 1].toPct);
      if (b.toPct !== null) expect(b.toPct).toBeGreaterThan(b.fromPct);
      expect(b.name.length).toBeGreaterThan(0);
      expect(b.meaning.length).toBeGreaterThan(10);
    });
    // The defaults pass the same checks a coach's edit must pass.
    const v = validateBandSet(
      set.bands.map((b) => ({
        name: b.name,
        fromPct: String(b.fromPct),
        toPct: b.toPct === null ? "" : String(b.toPct),
        meaning: b.meaning,
      })),
    );
    expect(v.ok).toBe(true);
  });

  it("uses words, never codes like L1, Z5a or P3, and no author names", () => {
    for (const key of BAND_SET_KEYS) {
      for (const b of defaultBandSet(key).bands) {
        expect(b.name).not.toMatch(/^[A-Z]\d|\d[a-c]$/);
        expect(`${b.name} ${b.meaning}`).not.toMatch(/friel|coggan|level \d|zone \d/i);
      }
    }
  });

  it("heart rate has no band above the severe domain (heart rate lags: Jamnick et al. 2020)", () => {
    for (const set of [bikeHr, runHr]) {
      expect(set.bands.at(-1)!.name).toBe("Severe");
      expect(set.bands.some((b) => b.name === "Extreme")).toBe(false);
    }
    expect(power.bands.at(-1)!.name).toBe("Extreme");
  });

  it("the 100 % mark (threshold) sits inside the band around threshold in every set", () => {
    for (const key of BAND_SET_KEYS) expect(bandOf(100, defaultBandSet(key)).name).toBe("Ridge");
  });
});

describe("classification at every boundary: [from, to)", () => {
  it.each(BAND_SET_KEYS)("%s: a boundary belongs to the band above, just under it to the band below", (key) => {
    const set = defaultBandSet(key);
    set.bands.forEach((b, i) => {
      expect(bandIndexOf(b.fromPct, set.bands)).toBe(i);
      if (b.toPct !== null) {
        expect(bandIndexOf(b.toPct, set.bands)).toBe(i + 1);
        expect(bandIndexOf(b.toPct - 0.001, set.bands)).toBe(i);
      }
    });
  });

  it("power, 250 W threshold: 149.9 W easy, 150 W steady (60 %), 199 W steady, 200 W heavy (80 %), 262 W ridge, 263 W severe", () => {
    const name = (w: number) => bandOfValue(w, 250, power).name;
    expect(name(149.9)).toBe("Easy");
    expect(name(150)).toBe("Steady");
    expect(name(199)).toBe("Steady");
    expect(name(200)).toBe("Heavy");
    expect(name(237.5)).toBe("Ridge"); // 95 % exactly, computed in floating point
    expect(name(262)).toBe("Ridge");
    expect(name(262.5)).toBe("Severe"); // 105 %
    expect(name(324)).toBe("Severe");
    expect(name(325)).toBe("Extreme"); // 130 %
  });

  it("heart rate, 170 bpm threshold: the top of the lowest band is 144 bpm (144.5 = 85 %), 145 is the next band", () => {
    // The old scheme put a value just under the boundary into the band above; every shown number must classify into
    // the row it is shown in.
    const name = (bpm: number) => bandOfValue(bpm, 170, bikeHr).name;
    expect(name(144)).toBe("Easy");
    expect(name(144.49)).toBe("Easy");
    expect(name(144.5)).toBe("Steady");
    expect(name(156)).toBe("Steady"); // 91.8 %
    expect(name(156.4)).toBe("Heavy"); // 92 %
    expect(name(163)).toBe("Heavy"); // 95.9 %
    expect(name(163.2)).toBe("Ridge"); // 96 %
    expect(name(171)).toBe("Ridge"); // 100.6 %
    expect(name(171.7)).toBe("Severe"); // 101 %
  });

  it("pace is % of threshold speed: 4:00/km threshold, 5:00/km is 80 % (easy), 4:52 is 82.2 % (steady), 3:28 is 115.4 % (extreme)", () => {
    const name = (s: number) => bandOfValue(s, 240, pace).name;
    expect(name(300)).toBe("Easy");
    expect(name(240 / 0.82)).toBe("Steady"); // exactly 82 % of speed
    expect(name(240 / 0.82 + 0.01)).toBe("Easy");
    expect(name(292)).toBe("Steady");
    expect(name(240)).toBe("Ridge");
    expect(name(240 / 1.04)).toBe("Severe");
    expect(name(240 / 1.04 + 0.01)).toBe("Ridge");
    expect(name(208)).toBe("Extreme");
  });

  it("every intensity falls in exactly one band (property)", () => {
    fc.assert(
      fc.property(fc.constantFrom(...BAND_SET_KEYS), fc.double({ min: 0, max: 400, noNaN: true }), (key, pct) => {
        const bands = defaultBandSet(key).bands;
        const matches = bands.filter((b) => pct + 1e-9 >= b.fromPct && (b.toPct === null || pct + 1e-9 < b.toPct));
        expect(matches).toHaveLength(1);
        expect(bands[bandIndexOf(pct, bands)]).toBe(matches[0]);
      }),
    );
  });
});

describe("absolute rows agree with classification", () => {
  it("power 250 W: rows share no number, and each shown whole number classifies into its own row", () => {
    const rows = bandRows(power, 250, (v) => `${v} W`);
    expect(rows.map((r) => r.range)).toEqual([
      "up to 149 W",
      "150 W – 199 W",
      "200 W – 237 W",
      "238 W – 262 W",
      "263 W – 324 W",
      "325 W and above",
    ]);
    rows.forEach((r, i) => {
      if (r.lo !== null) expect(bandIndexOf((r.lo / 250) * 100, power.bands)).toBe(i);
      if (r.hi !== null) expect(bandIndexOf((r.hi / 250) * 100, power.bands)).toBe(i);
    });
  });

  it("heart rate, any threshold 80–220 bpm: the top of each row is in the row, the next whole bpm in the next (property)", () => {
    fc.assert(
      fc.property(fc.integer({ min: 80, max: 220 }), fc.constantFrom(bikeHr, runHr), (t, set) => {
        const rows = bandRows(set, t, String);
        rows.forEach((r, i) => {
          if (r.hi !== null) {
            expect(bandOfValue(r.hi, t, set)).toBe(set.bands[i]);
            expect(bandOfValue(r.hi + 1, t, set)).toBe(set.bands[i + 1]);
            expect(rows[i + 1].lo).toBe(r.hi + 1);
          }
        });
      }),
    );
  });

  it("swim pace is % of critical swim speed (Wakayoshi et al. 1992): 1:30/100 m, 1:40 is Steady, 1:35 is Heavy, 1:27.4 is Severe, 1:21.8 is Extreme", () => {
    const name = (s: number) => bandOfValue(s, 90, swim).name;
    expect(name(90 / 0.84)).toBe("Steady"); // exactly 84 % of speed: 107.1 s
    expect(name(90 / 0.84 + 0.01)).toBe("Easy");
    expect(name(100)).toBe("Steady"); // 90 %
    expect(name(95)).toBe("Heavy"); // 94.7 %
    expect(name(90)).toBe("Ridge");
    expect(name(90 / 1.03)).toBe("Severe"); // 87.4 s
    expect(name(90 / 1.03 + 0.01)).toBe("Ridge");
    expect(name(90 / 1.1)).toBe("Extreme"); // 81.8 s
    expect(name(90 / 1.1 + 0.01)).toBe("Severe");
  });

  it("pace, 4:00/km: slowest and fastest whole seconds of each row classify into that row", () => {
    const rows = bandRows(pace, 240, (s) => `${s}`);
    rows.forEach((r, i) => {
      if (r.lo !== null) {
        expect(bandOfValue(r.lo, 240, pace)).toBe(pace.bands[i]);
        expect(bandOfValue(r.lo - 1, 240, pace)).toBe(pace.bands[i + 1]);
      }
      if (r.hi !== null) expect(bandOfValue(r.hi, 240, pace)).toBe(pace.bands[i]);
    });
    expect(rows[0].range).toBe("293 or slower"); // 240/0.82 = 292.7 s
  });
});

describe("shades: one teal ramp, pale to deep", () => {
  it("starts pale and ends deep; brick edge only for bands at or above threshold", () => {
    expect(bandShade(0, 6)).toBe("#e3eeec");
    expect(bandShade(5, 6)).toBe("#123d3a");
    const lum = (hex: string) =>
      parseInt(hex.slice(1, 3), 16) + parseInt(hex.slice(3, 5), 16) + parseInt(hex.slice(5, 7), 16);
    for (let i = 1; i < 6; i++) expect(lum(bandShade(i, 6))).toBeLessThan(lum(bandShade(i - 1, 6)));
    expect(bandRows(power, 250, String).map((r) => r.aboveThreshold)).toEqual([false, false, false, false, true, true]);
  });
});

describe("time in band from a value histogram", () => {
  it("counts seconds by the band of each whole watt", () => {
    const hist = valueHistogram([100, 150, 150, 200, null, 0, 262, 263, 400, 149.6]);
    // 149.6 rounds to 150 W (watts are shown to 1).
    expect(minutesPerBand(hist, 250, power).map((m) => Math.round(m * 60))).toEqual([1, 3, 1, 1, 1, 1]);
  });
});

describe("validating a coach's band set", () => {
  const rows = (...r: [string, string, string][]): BandInputRow[] =>
    r.map(([name, fromPct, toPct]) => ({ name, fromPct, toPct, meaning: "" }));
  const good = rows(["Gentle", "0", "70"], ["Working", "70", "100"], ["Hard", "100", ""]);

  it("accepts a contiguous, ordered set of 3–8 named bands", () => {
    const v = validateBandSet(good);
    expect(v.ok).toBe(true);
    if (v.ok)
      expect(v.bands.map((b) => [b.fromPct, b.toPct])).toEqual([
        [0, 70],
        [70, 100],
        [100, null],
      ]);
  });
  it("refuses a gap, with the message on the row that starts too high", () => {
    const v = validateBandSet(rows(["Gentle", "0", "70"], ["Working", "75", "100"], ["Hard", "100", ""]));
    expect(v.ok).toBe(false);
    if (!v.ok) expect(v.errors.rows[1].fromPct).toMatch(/Gap/);
  });
  it("refuses an overlap", () => {
    const v = validateBandSet(rows(["Gentle", "0", "70"], ["Working", "65", "100"], ["Hard", "100", ""]));
    if (v.ok) throw new Error("accepted an overlap");
    expect(v.errors.rows[1].fromPct).toMatch(/Overlap/);
  });
  it("refuses unordered and non-numeric boundaries", () => {
    const unordered = validateBandSet(rows(["Gentle", "0", "70"], ["Working", "70", "60"], ["Hard", "60", ""]));
    if (unordered.ok) throw new Error("accepted unordered bands");
    expect(unordered.errors.rows[1].toPct).toMatch(/above the lower/);
    const text = validateBandSet(rows(["Gentle", "0", "seventy"], ["Working", "70", "100"], ["Hard", "100", ""]));
    if (text.ok) throw new Error("accepted text");
    expect(text.errors.rows[0].toPct).toMatch(/whole number/);
    const decimal = validateBandSet(rows(["Gentle", "0", "70.5"], ["Working", "70.5", "100"], ["Hard", "100", ""]));
    expect(decimal.ok).toBe(false);
  });
  it("refuses empty names, duplicate names and codes", () => {
    const v = validateBandSet(rows(["", "0", "70"], ["Hard", "70", "100"], ["hard", "100", ""]));
    if (v.ok) throw new Error("accepted");
    expect(v.errors.rows[0].name).toMatch(/name/);
    expect(v.errors.rows[2].name).toMatch(/Two bands/);
    const code = validateBandSet(rows(["Z1", "0", "70"], ["Hard", "70", "100"], ["Harder", "100", ""]));
    if (code.ok) throw new Error("accepted a code");
    expect(code.errors.rows[0].name).toMatch(/word/);
  });
  it("refuses fewer than 3 or more than 8 bands, a first band not at 0 and a closed top band", () => {
    expect(validateBandSet(rows(["A band", "0", "100"], ["B band", "100", ""])).ok).toBe(false);
    const nine = Array.from({ length: 9 }, (_, i) => ({
      name: `Band ${String.fromCharCode(97 + i)}`,
      fromPct: String(i * 20),
      toPct: i === 8 ? "" : String((i + 1) * 20),
      meaning: "",
    }));
    const v9 = validateBandSet(nine);
    if (v9.ok) throw new Error("accepted nine");
    expect(v9.errors.form).toMatch(/at most 8/);
    const start = validateBandSet(rows(["Gentle", "10", "70"], ["Working", "70", "100"], ["Hard", "100", ""]));
    if (start.ok) throw new Error("accepted");
    expect(start.errors.rows[0].fromPct).toMatch(/starts at 0/);
    const closed = validateBandSet(rows(["Gentle", "0", "70"], ["Working", "70", "100"], ["Hard", "100", "150"]));
    if (closed.ok) throw new Error("accepted");
    expect(closed.errors.rows[2].toPct).toMatch(/open/);
  });
  it("a stored set that no longer passes falls back to the default", () => {
    expect(bandSetFromStored("bike:power", [{ name: "x", fromPct: 5 }]).isDefault).toBe(true);
    expect(
      bandSetFromStored("bike:power", [
        { name: "Gentle", fromPct: 0, toPct: 70 },
        { name: "Working", fromPct: 70, toPct: 100 },
        { name: "Hard", fromPct: 100, toPct: null },
      ]).bands[2].name,
    ).toBe("Hard");
  });
});

describe("zone minutes from absolute tops follow the same [from, to) convention", () => {
  it("a value on a top counts in the zone above; just under it, in the zone below", async () => {
    const { minutesInZones } = await import("~/lib/training");
    // Tops 120 and 150 bpm: 119.9 → first, 120 → second, 150 → third.
    expect(minutesInZones([119.9, 120, 149.9, 150], [120, 150]).map((m) => Math.round(m * 60))).toEqual([1, 2, 1]);
  });
});
