import { describe, expect, it } from "vitest";
import { crossCheck } from "~/lib/training";

describe("cross-check difference (in % of the two estimates' mean; bands 3 % / 6 %, common practice)", () => {
  it("power: 276 and 279 W are 1.1 % apart and agree; the mean is 277.5", () => {
    // |279 − 276| / 277.5 = 1.081 % → 1.1
    const c = crossCheck(276, 279, "power");
    expect(c).toMatchObject({ diffPct: 1.1, mean: 277.5, agreement: "agree" });
    expect(crossCheck(279, 276, "power").diffPct).toBe(1.1);
  });
  it("bands: 4.9 % roughly agrees, 13.2 % disagrees", () => {
    // |290 − 276| / 283 = 4.947 %; |315 − 276| / 295.5 = 13.198 %
    expect(crossCheck(276, 290, "power")).toMatchObject({ diffPct: 4.9, agreement: "roughly" });
    expect(crossCheck(276, 315, "power")).toMatchObject({ diffPct: 13.2, agreement: "disagree" });
  });
  it("pace is compared on speed: 240 and 250 s/km", () => {
    // speeds 1/240 and 1/250: difference 0.0001667, mean 0.004083 → 4.08 %; the mean pace is 1 / mean speed = 244.9 s/km
    const c = crossCheck(240, 250, "pace");
    expect(c.diffPct).toBe(4.1);
    expect(c.mean).toBeCloseTo(244.898, 2);
  });
});
