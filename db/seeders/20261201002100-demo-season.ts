import { QueryTypes, type QueryInterface } from "sequelize";
import { writeTransaction } from "../../app/.server/db";
import { ScheduledSession, ShelfSession, Threshold, User } from "../../app/.server/models";
import { applyBoardOp } from "../../app/.server/services/board";
import { materialize } from "../../app/.server/services/materialize";
import { createPlan, loadPlan } from "../../app/.server/services/plans";
import { addDays, mondayOf, todayIn } from "../../app/lib/dates";
import { DEMO_ACCOUNTS } from "../demo/accounts";

/**
 * The demo season (invented): thresholds for the three athletes, a 12-week road plan on the coach's board that began
 * four weeks ago, assigned to the road cyclist, with his past sessions marked done.
 */
export async function up({ context: qi }: { context: QueryInterface }) {
  const email = (key: string) => DEMO_ACCOUNTS.people.find((p) => p.key === key)!.email;
  const coach = await User.findOne({ where: { email: email("coach") } });
  const tomas = await User.findOne({ where: { email: email("cyclist") } });
  const ada = await User.findOne({ where: { email: email("triathlete") } });
  const jonah = await User.findOne({ where: { email: email("runner") } });
  if (!coach || !tomas || !ada || !jonah) return;
  const [{ n }] = await qi.sequelize.query<{ n: number }>("SELECT COUNT(*) AS n FROM season_plans WHERE owner_id = ?", {
    replacements: [coach.id],
    type: QueryTypes.SELECT,
  });
  if (n > 0) return;

  const today = todayIn(tomas.timezone);
  const start = addDays(mondayOf(today), -28);
  const earlier = addDays(start, -7);
  await writeTransaction(async (t) => {
    const rows = [
      { athleteId: tomas.id, sport: "bike", metric: "power", value: 262, unit: "W", effectiveFrom: earlier },
      { athleteId: tomas.id, sport: "bike", metric: "heart_rate", value: 168, unit: "bpm", effectiveFrom: earlier },
      { athleteId: ada.id, sport: "bike", metric: "power", value: 214, unit: "W", effectiveFrom: earlier },
      { athleteId: ada.id, sport: "run", metric: "pace", value: 285, unit: "s/km", effectiveFrom: earlier },
      { athleteId: ada.id, sport: "swim", metric: "pace", value: 104, unit: "s/100m", effectiveFrom: earlier },
      { athleteId: jonah.id, sport: "run", metric: "pace", value: 228, unit: "s/km", effectiveFrom: earlier },
      { athleteId: jonah.id, sport: "run", metric: "heart_rate", value: 176, unit: "bpm", effectiveFrom: earlier },
    ] as const;
    for (const r of rows) await Threshold.create({ ...r, source: "seed", createdBy: coach.id }, { transaction: t });
  });

  const plan = await createPlan(coach.id, {
    name: "Harbour Line spring build",
    sport: "bike",
    description: "Twelve weeks of road preparation: aerobic base, then threshold and capacity work.",
    alignment: "start",
    date: start,
    weeks: 12,
    weeklyHours: 8,
    pattern: "3:1",
    testEveryWeeks: 6,
  });
  const shelf = new Map((await ShelfSession.findAll({ where: { ownerId: coach.id } })).map((s) => [s.name, s.id]));
  const { weeks } = await loadPlan(coach.id, plan.id);
  for (const w of weeks) {
    const hard = w.phase === "base" ? "Heavy 2 × 20" : "Threshold repeats";
    const days: [number, string][] = w.recovery
      ? [
          [2, "Recovery spin"],
          [5, "Endurance 90"],
        ]
      : [
          [w.test ? 3 : 1, hard],
          [3, w.phase === "base" ? "Heart-rate endurance" : "Severe 5 × 4"],
          [5, "Endurance 90"],
          [6, "Recovery spin"],
        ];
    for (const [day, name] of days) {
      const sessionId = shelf.get(name);
      if (sessionId)
        await applyBoardOp(coach.id, plan.id, { op: "copy", sessionId, toWeek: w.id, toDay: day, toIndex: 99 });
    }
  }
  await writeTransaction((transaction) => materialize(plan.id, tomas, start, { assignedBy: coach.id, transaction }));

  // Tomás's past four weeks: mostly done, one skipped, with invented effort scores.
  const past = await ScheduledSession.findAll({ where: { athleteId: tomas.id }, order: [["date", "ASC"]] });
  let k = 0;
  for (const s of past) {
    if (s.date >= today) continue;
    k++;
    const skipped = k % 9 === 0;
    const effort = s.testProtocol ? 9 : /Recovery/.test(s.name) ? 2 : /Endurance/.test(s.name) ? 4 : 7;
    await s.update({
      status: skipped ? "skipped" : "done",
      effortScore: skipped ? null : effort,
      actualMinutes: skipped ? null : Math.round((s.plannedDurationS / 60) * (0.92 + (k % 5) * 0.03)),
      completedAt: new Date(`${s.date}T18:00:00Z`),
    });
  }
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query("DELETE FROM season_plans WHERE name = 'Harbour Line spring build'");
  await qi.sequelize.query("DELETE FROM thresholds WHERE source = 'seed'");
}
