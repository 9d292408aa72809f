import { QueryTypes } from "sequelize";
import { hashPassword } from "~/.server/auth";
import { db } from "~/.server/db";
import { CoachAthlete, User } from "~/.server/models";
import { rosterFor } from "~/.server/services/accounts";
import { compare } from "./lib";

/** The roster of a coach with 50 athletes (each row also reads thresholds, retest due and four weeks of load), against one raw SQL join of the athlete rows. */
export async function run() {
  const hash = await hashPassword("bench-password-1");
  const coach = await User.create({ role: "coach", email: "bench.coach@example.test", name: "Bench Coach", passwordHash: hash });
  for (let i = 0; i < 50; i++) {
    const a = await User.create({ role: "athlete", email: `bench.${i}@example.test`, name: `Athlete ${i}`, passwordHash: hash });
    await CoachAthlete.create({ coachId: coach.id, athleteId: a.id });
  }
  const raw = () =>
    db().query(
      "SELECT u.id, u.name, u.email, u.timezone, ca.created_at FROM coach_athletes ca JOIN users u ON u.id = ca.athlete_id WHERE ca.coach_id = ? ORDER BY u.name",
      { replacements: [coach.id], type: QueryTypes.SELECT },
    );
  return [await compare("roster of 50 athletes, with thresholds, retest due and 4-week load", () => rosterFor(coach.id), raw, { baselineName: "raw SQL join of the athlete rows alone", runs: 10 })];
}
