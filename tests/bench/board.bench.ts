import { hashPassword } from "~/.server/auth";
import { writeTransaction } from "~/.server/db";
import { CoachAthlete, PlanItem, PlanWeek, Session, SessionBlock, Threshold, User } from "~/.server/models";
import { calendarRange } from "~/.server/services/calendar";
import { materialize } from "~/.server/services/materialize";
import { createPlan, loadPlan } from "~/.server/services/plans";
import { addDays } from "~/lib/dates";
import * as healthz from "~/routes/healthz";
import { compare, median, type BenchFigure } from "./lib";

/**
 * A 52-week plan, 8 sessions a week, 6 blocks each: the board loader and a 12-week calendar read against an empty
 * route on the same server code, and materializing the plan for one athlete.
 */
export async function run(): Promise<BenchFigure[]> {
  const hash = await hashPassword("bench-password-1");
  const coach = await User.create({ role: "coach", email: "board.bench@example.test", name: "Board Bench", passwordHash: hash });
  const athletes: User[] = [];
  for (let i = 0; i < 4; i++) {
    const a = await User.create({ role: "athlete", email: `board.athlete${i}@example.test`, name: `Board Athlete ${i}`, passwordHash: hash });
    await CoachAthlete.create({ coachId: coach.id, athleteId: a.id });
    await Threshold.create({ athleteId: a.id, sport: "bike", metric: "power", value: 260, unit: "W", effectiveFrom: "2026-01-01", source: "manual" });
    athletes.push(a);
  }
  const blocks = [
    { kind: "warmup", durationS: 600, target: { metric: "power", lowPct: 50, highPct: 65 } },
    { kind: "steady", durationS: 900, target: { metric: "power", lowPct: 70, highPct: 75 } },
    { kind: "repeats", count: 4, work: { durationS: 300, target: { metric: "power", lowPct: 105, highPct: 110 } }, recovery: { durationS: 180, target: { metric: "power", lowPct: 50 } } },
    { kind: "ramp", durationS: 300, metric: "power", fromPct: 70, toPct: 95 },
    { kind: "open", durationS: 300, cue: "Spin" },
    { kind: "cooldown", durationS: 600, target: { metric: "power", lowPct: 45, highPct: 55 } },
  ];
  const session = await Session.create({ ownerId: coach.id, name: "Bench session", sport: "bike" });
  await SessionBlock.bulkCreate(blocks.map((spec, position) => ({ sessionId: session.id, position, kind: spec.kind, spec })));
  const plan = await createPlan(coach.id, { name: "Bench 52", sport: "bike", description: "", alignment: "start", date: "2027-01-04", weeks: 52, weeklyHours: 10, pattern: "3:1", testEveryWeeks: 6 });
  const weeks = await PlanWeek.findAll({ where: { planId: plan.id } });
  await PlanItem.destroy({ where: { planId: plan.id } });
  await PlanItem.bulkCreate(
    weeks.flatMap((w) => Array.from({ length: 8 }, (_, k) => ({ planId: plan.id, weekId: w.id, day: k % 7, position: Math.floor(k / 7), sourceSessionId: session.id, name: `S${k}`, sport: "bike", blocks }))),
  );
  const empty = () => healthz.loader();
  const figures = [
    await compare("board loader, 52 weeks × 8 sessions × 6 blocks", () => loadPlan(coach.id, plan.id), empty, { baselineName: "empty route (healthz loader)", runs: 9 }),
  ];
  // Each run places the plan for a different athlete, so every calendar holds the plan exactly once.
  let next = 0;
  const materializeMs = await median(
    async () => {
      const athlete = athletes[next++];
      await writeTransaction((transaction) => materialize(plan.id, athlete, "2027-01-04", { assignedBy: coach.id, transaction }));
    },
    { runs: 3, warmup: 1 },
  );
  const athlete = athletes[0];
  const emptyMs = await median(empty, { runs: 20 });
  figures.push({ name: "materialize 416 sessions (2,912 steps) for one athlete", subjectMs: Math.round(materializeMs), baselineMs: Math.round(emptyMs * 1000) / 1000, baseline: "empty route (healthz loader)", ratio: Math.round(materializeMs / emptyMs) });
  figures.push(await compare("calendar JSON, 12 weeks", () => calendarRange(athlete.id, "2027-03-01", addDays("2027-03-01", 83)), empty, { baselineName: "empty route (healthz loader)", runs: 15 }));
  return figures;
}
