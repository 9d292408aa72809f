import { describe, expect, it } from "vitest";
import { trainingPaces } from "~/lib/training";

/**
 * Table values of Daniels J, Daniels' Running Formula (training-pace table per index), seconds per km (per 400 m for
 * repetition). From memory: the book was not at hand to confirm each figure. Tolerance ±2 % (±3 % for the fast end
 * of the easy range, which the book gives as a band).
 */
const TABLE: Record<number, { M: number; T: number; I: number; R400: number; easyFast: number }> = {
  40: { M: 5 * 60 + 29, T: 5 * 60 + 6, I: 4 * 60 + 42, R400: 106, easyFast: 5 * 60 + 52 },
  50: { M: 4 * 60 + 31, T: 4 * 60 + 15, I: 3 * 60 + 55, R400: 88, easyFast: 4 * 60 + 57 },
  60: { M: 3 * 60 + 52, T: 3 * 60 + 40, I: 3 * 60 + 23, R400: 75, easyFast: 4 * 60 + 15 },
};

describe("training paces per running index (Daniels; table values from memory, ±2 %)", () => {
  for (const [index, t] of Object.entries(TABLE)) {
    it(`index ${index}`, () => {
      const p = trainingPaces(Number(index));
      const near = (got: number, want: number, tol = 0.02) => expect(Math.abs(got / want - 1)).toBeLessThanOrEqual(tol);
      near(p.marathon, t.M);
      near(p.threshold, t.T);
      near(p.interval, t.I);
      near(p.repetition * 0.4, t.R400);
      near(p.easy.fastS, t.easyFast, 0.03);
      expect(p.easy.slowS).toBeGreaterThan(p.easy.fastS);
      expect(p.repetition).toBeLessThan(p.interval);
    });
  }
});
