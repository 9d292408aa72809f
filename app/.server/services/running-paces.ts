import { Op } from "sequelize";
import { FieldTest, Threshold } from "../models";
import { trainingPaces } from "~/lib/training";

/**
 * Training paces from the athlete's latest race-based running index, each also as % of threshold speed — the unit
 * session targets use for pace — so a coach can put them straight into a block.
 */
export async function runningPacesFor(athleteId: number) {
  const test = await FieldTest.findOne({
    where: { athleteId, protocol: "run_race", status: "active" },
    order: [
      ["testedOn", "DESC"],
      ["id", "DESC"],
    ],
  });
  const index = (test?.derived as { runningIndex?: number } | undefined)?.runningIndex;
  if (!test || !index || index < 30) return null;
  const threshold = await Threshold.findOne({
    where: { athleteId, sport: "run", metric: "pace", effectiveFrom: { [Op.lte]: "9999-12-31" } },
    order: [
      ["effectiveFrom", "DESC"],
      ["id", "DESC"],
    ],
  });
  const p = trainingPaces(index);
  const ref = threshold?.value ?? p.threshold;
  const pct = (pace: number) => Math.round((ref / pace) * 100);
  const row = (key: string, name: string, slowS: number, fastS = slowS) => ({
    key,
    name,
    slowS: Math.round(slowS),
    fastS: Math.round(fastS),
    lowPct: pct(slowS),
    highPct: pct(fastS),
  });
  return {
    index: Math.round(index * 10) / 10,
    testedOn: test.testedOn,
    thresholdPaceS: Math.round(ref),
    rows: [
      row("easy", "Easy", p.easy.slowS, p.easy.fastS),
      row("marathon", "Marathon", p.marathon),
      row("threshold", "Threshold", p.threshold),
      row("interval", "Interval", p.interval),
      row("repetition", "Repetition", p.repetition),
    ],
  };
}
