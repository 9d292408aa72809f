import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import * as engine from "~/lib/training";

const dir = path.resolve("app/lib/training");

describe("the training engine stays pure and isomorphic", () => {
  it("imports no framework, Node built-in or server module", () => {
    for (const file of fs.readdirSync(dir).filter((f) => f.endsWith(".ts"))) {
      const source = fs.readFileSync(path.join(dir, file), "utf8");
      const imports = [...source.matchAll(/from\s+"([^"]+)"/g)].map((m) => m[1]);
      for (const spec of imports) {
        expect(spec, `${file} imports ${spec}`).not.toMatch(/^(react|react-router|node:|fs$|path$|sequelize)|\.server/);
      }
    }
  });
  it("exports the agreed API", () => {
    for (const name of [
      "thresholdFromTwentyMinute",
      "thresholdFromEightMinute",
      "thresholdFromRamp",
      "criticalPower",
      "timeToExhaustion",
      "thresholdHeartRate",
      "criticalSwimSpeed",
      "runningIndex",
      "raceTimeForIndex",
      "thresholdPaceForIndex",
      "defaultBandSet",
      "bandOf",
      "bandIndexOf",
      "bandShade",
      "validateBandSet",
      "minutesPerBand",
      "resolveTarget",
      "parseActivity",
      "meanMaximal",
      "powerCurve",
      "bestEffort",
      "detectRampTest",
      "pacingSplits",
      "heartRateDrift",
      "workKj",
      "effortLoad",
      "trimpBanister",
      "trimpEdwards",
      "monotonyStrain",
      "fitnessFatigue",
      "acuteChronicRatio",
      "estimateSession",
      "seasonSkeleton",
    ]) {
      expect(typeof (engine as Record<string, unknown>)[name], name).toBe("function");
    }
  });
});
