import { Op, type Transaction } from "sequelize";
import { writeTransaction } from "../db";
import { BandSetRow, CoachAthlete, type User } from "../models";
import { DomainError } from "../errors";
import { bandTable } from "~/lib/band-table";
import {
  BAND_SET_KEYS,
  bandSetFromStored,
  bandSetKeyFor,
  defaultBandSets,
  parseBandSetKey,
  validateBandSet,
  type BandInputRow,
  type BandSet,
  type BandSetErrors,
  type BandSetKey,
  type Metric,
} from "~/lib/training";

/**
 * Whose band sets a user sees: a coach their own, an athlete their coach's (the first coach who took them on),
 * everyone else (self-coached athletes, admins) Pacewright's defaults.
 */
export async function bandOwnerId(user: Pick<User, "id" | "role">, transaction?: Transaction): Promise<number | null> {
  if (user.role === "coach") return user.id;
  if (user.role !== "athlete") return null;
  const link = await CoachAthlete.findOne({ where: { athleteId: user.id }, order: [["id", "ASC"]], transaction });
  return link?.coachId ?? null;
}

export async function bandSetsOfCoach(
  coachId: number | null,
  transaction?: Transaction,
): Promise<Record<BandSetKey, BandSet>> {
  const sets = defaultBandSets();
  if (coachId === null) return sets;
  const rows = await BandSetRow.findAll({ where: { coachId, setKey: { [Op.in]: [...BAND_SET_KEYS] } }, transaction });
  for (const r of rows) sets[r.setKey as BandSetKey] = bandSetFromStored(r.setKey as BandSetKey, r.bands);
  return sets;
}

/** Every band set the user sees, keyed "sport:metric". */
export async function bandSetsFor(user: Pick<User, "id" | "role">, transaction?: Transaction) {
  return bandSetsOfCoach(await bandOwnerId(user, transaction), transaction);
}

/** The one band set for a sport and metric that the user sees. */
export async function bandSetFor(
  user: Pick<User, "id" | "role">,
  sport: string,
  metric: Metric,
  transaction?: Transaction,
) {
  return (await bandSetsFor(user, transaction))[bandSetKeyFor(sport, metric)];
}

/** Latest change to a coach's band sets, for caches (feeds) that must rebuild when bands change. */
export async function bandSetsStamp(coachId: number | null): Promise<string> {
  if (coachId === null) return "default";
  const latest = await BandSetRow.max<Date, BandSetRow>("updatedAt", { where: { coachId } });
  const count = await BandSetRow.count({ where: { coachId } });
  return `${count}:${latest ? new Date(latest).toISOString() : "-"}`;
}

export type SaveBandSetResult = { ok: true; set: BandSet } | { ok: false; errors: BandSetErrors };

/** Saves a coach's edit of one set after validation; bad input saves nothing. */
export async function saveBandSet(coach: User, key: string, rows: BandInputRow[]): Promise<SaveBandSetResult> {
  if (coach.role !== "coach") throw new DomainError("forbidden", "Only coaches edit band sets.");
  if (!parseBandSetKey(key)) return { ok: false, errors: { form: "Choose a band set to edit.", rows: {} } };
  const v = validateBandSet(rows);
  if (!v.ok) return v;
  await writeTransaction(async (transaction) => {
    const existing = await BandSetRow.findOne({ where: { coachId: coach.id, setKey: key }, transaction });
    if (existing) {
      existing.bands = v.bands;
      existing.changed("updatedAt", true);
      await existing.save({ transaction });
    } else {
      await BandSetRow.create({ coachId: coach.id, setKey: key, bands: v.bands }, { transaction });
    }
  });
  return { ok: true, set: bandSetFromStored(key as BandSetKey, v.bands) };
}

/** Back to Pacewright's defaults for one set. */
export async function restoreDefaultBandSet(coach: User, key: string) {
  if (coach.role !== "coach") throw new DomainError("forbidden", "Only coaches edit band sets.");
  if (!parseBandSetKey(key)) return false;
  await writeTransaction((transaction) =>
    BandSetRow.destroy({ where: { coachId: coach.id, setKey: key }, transaction }),
  );
  return true;
}

/** The bands of a new threshold as plain lines for e-mails ("Easy: up to 157 W"); empty where we keep no set. */
export async function thresholdBandsText(
  athlete: Pick<User, "id" | "role">,
  sport: string,
  metric: Metric,
  value: number,
  unit: string,
  transaction?: Transaction,
) {
  const sets = await bandSetsFor(athlete, transaction);
  const table = bandTable({ sport, metric, value, unit }, sets[bandSetKeyFor(sport, metric)]);
  if (!table) return "";
  return [`${table.title} for the new threshold:`, ...table.rows.map((r) => `${r.name}: ${r.range}`)].join("\n");
}
