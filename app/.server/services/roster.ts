import { Op, QueryTypes } from "sequelize";
import { db } from "../db";
import { CoachAthlete, Invitation, Threshold, User } from "../models";
import { DAY_COLUMNS, seriesFromRows, warmStart, type DayRow } from "./load";
import { rosterFigures } from "./load-figures";
import { retestFrom } from "./retests";
import { addDays, todayIn } from "~/lib/dates";
import { defaultBandSet } from "~/lib/training";

/**
 * A coach's roster: each athlete with current thresholds, retest due and four weeks of load and compliance. Read
 * set-based — one query per kind of row for the whole roster, then the same load model as the athlete's own load
 * page per athlete in memory — so the page costs a handful of statements whatever the roster's size.
 */
export async function rosterFor(coachId: number) {
  const links = await CoachAthlete.findAll({ where: { coachId } });
  const ids = links.map((l) => l.athleteId);
  const [athletes, invitations] = await Promise.all([
    ids.length ? User.findAll({ where: { id: ids }, order: [["name", "ASC"]] }) : Promise.resolve([] as User[]),
    Invitation.findAll({
      where: { coachId, acceptedAt: null, expiresAt: { [Op.gt]: new Date() } },
      order: [["createdAt", "DESC"]],
    }),
  ]);
  const since = new Map(links.map((l) => [l.athleteId, l.createdAt]));
  const todays = new Map(athletes.map((a) => [a.id, todayIn(a.timezone)]));
  const dates = [...todays.values()].sort();
  const earliest = dates[0];
  const latest = dates.at(-1);
  const [thresholds, lastTests, plannedTests, dayRows] = ids.length
    ? await Promise.all([
        Threshold.findAll({
          where: { athleteId: ids, effectiveFrom: { [Op.lte]: latest } },
          order: [
            ["effectiveFrom", "ASC"],
            ["id", "ASC"],
          ],
        }),
        db().query<{ athlete_id: number; tested_on: string }>(
          "SELECT athlete_id, MAX(tested_on) AS tested_on FROM field_tests WHERE athlete_id IN (:ids) AND status = 'active' GROUP BY athlete_id",
          { replacements: { ids }, type: QueryTypes.SELECT },
        ),
        db().query<{ athlete_id: number; date: string; name: string }>(
          "SELECT athlete_id, date, name FROM scheduled_sessions WHERE athlete_id IN (:ids) AND status = 'planned' AND test_protocol IS NOT NULL AND date >= :from ORDER BY date, position, id",
          { replacements: { ids, from: earliest }, type: QueryTypes.SELECT },
        ),
        db().query<DayRow & { athlete_id: number }>(
          `SELECT athlete_id, ${DAY_COLUMNS} FROM scheduled_sessions WHERE athlete_id IN (:ids) AND date BETWEEN :from AND :to AND status != 'cancelled'`,
          { replacements: { ids, from: warmStart(addDays(earliest!, -27)), to: latest }, type: QueryTypes.SELECT },
        ),
      ])
    : [[], [], [], []];

  const group = <T extends { athlete_id: number }>(rows: T[]) => {
    const by = new Map<number, T[]>();
    for (const r of rows) {
      const id = Number(r.athlete_id);
      if (!by.has(id)) by.set(id, []);
      by.get(id)!.push(r);
    }
    return by;
  };
  const rowsBy = group(dayRows);
  const thresholdsBy = new Map<number, Threshold[]>();
  for (const t of thresholds) {
    if (!thresholdsBy.has(t.athleteId)) thresholdsBy.set(t.athleteId, []);
    thresholdsBy.get(t.athleteId)!.push(t);
  }
  const plannedBy = group(plannedTests);
  const lastBy = new Map(lastTests.map((r) => [Number(r.athlete_id), r.tested_on]));
  const powerBands = defaultBandSet("bike:power");

  return {
    athletes: athletes.map((a) => {
      const today = todays.get(a.id)!;
      const latestBy = new Map<string, Threshold>();
      for (const t of thresholdsBy.get(a.id) ?? [])
        if (t.effectiveFrom <= today) latestBy.set(`${t.sport}:${t.metric}`, t);
      const lastTest = lastBy.get(a.id) ?? null;
      const planned = (plannedBy.get(a.id) ?? []).find((p) => p.date >= today);
      const retest = retestFrom(lastTest, planned);
      const from = addDays(today, -27);
      const warmFrom = warmStart(from);
      const mine = (rowsBy.get(a.id) ?? []).filter((r) => r.date >= warmFrom && r.date <= today);
      // Counts and the ratio do not depend on band minutes, so no ride files are read for the roster.
      const load = rosterFigures(seriesFromRows({ rows: mine, rides: new Map(), powerBands, from, to: today, today }));
      return {
        id: a.id,
        name: a.name,
        email: a.email,
        timezone: a.timezone,
        since: since.get(a.id)!.toISOString(),
        thresholds: [...latestBy.values()].map((t) => ({
          sport: t.sport,
          metric: t.metric,
          value: t.value,
          unit: t.unit,
          since: t.effectiveFrom,
        })),
        retest,
        load,
        today,
      };
    }),
    invitations: invitations.map((i) => ({
      id: i.id,
      email: i.email,
      name: i.name,
      sentAt: i.updatedAt.toISOString(),
      expiresAt: i.expiresAt.toISOString(),
    })),
  };
}
