/**
 * Just over 300 lines on purpose: the board's operations, their schema and the board view read and write the same
 * per-day order of a plan's items, and the writer and its readers stay together.
 */
import { Op, QueryTypes, type Transaction } from "sequelize";
import { z } from "zod";
import { db, writeTransaction } from "../db";
import { boardView } from "~/lib/board";
import type { Block } from "~/lib/training";
import { PlanItem, PlanWeek, SeasonPlan, type User } from "../models";
import { bandSetFor } from "./bands";
import { bumpVersion, itemView, requirePlan } from "./plans";
import { getShelfSession } from "./shelf";
import { DomainError } from "../errors";

const target = {
  toWeek: z.number().int().positive(),
  toDay: z.number().int().min(0).max(6),
  toIndex: z.number().int().min(0).max(1000),
};

/** Everything the board can ask for; `version` is the plan version the board was drawn from. */
export const boardOpSchema = z.discriminatedUnion("op", [
  z.object({
    op: z.literal("copy"),
    version: z.number().int().optional(),
    sessionId: z.number().int().positive(),
    ...target,
  }),
  z.object({
    op: z.literal("move"),
    version: z.number().int().optional(),
    itemId: z.number().int().positive(),
    ...target,
  }),
  z.object({ op: z.literal("remove"), version: z.number().int().optional(), itemId: z.number().int().positive() }),
  z.object({
    op: z.literal("duplicate-week"),
    version: z.number().int().optional(),
    fromWeek: z.number().int().positive(),
    toWeek: z.number().int().positive(),
  }),
  z.object({
    op: z.literal("move-week"),
    version: z.number().int().optional(),
    fromWeek: z.number().int().positive(),
    toWeek: z.number().int().positive(),
  }),
  z.object({
    op: z.literal("note"),
    version: z.number().int().optional(),
    itemId: z.number().int().positive(),
    notes: z.string().max(2000, "Keep the note under 2000 characters."),
  }),
  z.object({
    op: z.literal("time"),
    version: z.number().int().optional(),
    itemId: z.number().int().positive(),
    timeOfDay: z
      .string()
      .regex(/^([01]\d|2[0-3]):[0-5]\d$/)
      .nullable(),
  }),
]);
export type BoardOp = z.infer<typeof boardOpSchema>;

/** Rewrites one day slot's positions as 0…n−1 in the given order, in two passes so the unique index never clashes. */
async function writeOrder(weekId: number, day: number, ids: number[], transaction: Transaction) {
  if (ids.length === 0) return;
  for (let i = 0; i < ids.length; i++)
    await PlanItem.update({ weekId, day, position: -1 - i }, { where: { id: ids[i] }, transaction });
  for (let i = 0; i < ids.length; i++) await PlanItem.update({ position: i }, { where: { id: ids[i] }, transaction });
}

async function slotIds(weekId: number, day: number, transaction: Transaction, except?: number) {
  const rows = await PlanItem.findAll({
    where: { weekId, day, ...(except ? { id: { [Op.ne]: except } } : {}) },
    order: [["position", "ASC"]],
    attributes: ["id"],
    transaction,
  });
  return rows.map((r) => r.id);
}

async function week(planId: number, weekId: number, transaction: Transaction) {
  const w = await PlanWeek.findOne({ where: { id: weekId, planId }, transaction });
  if (!w) throw new DomainError("not_found", "That week is not part of this plan.");
  return w;
}

/**
 * Applies one board change in one write transaction: ownership, then the version check (a stale board gets 409),
 * then the change with every touched day renumbered, then a new plan version. Returns the plan's items afterwards.
 */
export async function applyBoardOp(ownerId: number, planId: number, op: BoardOp) {
  const shelfSession = op.op === "copy" ? await getShelfSession(ownerId, op.sessionId) : null;
  if (op.op === "copy" && !shelfSession) throw new DomainError("not_found", "That session is not on your shelf.");
  return writeTransaction(async (transaction) => {
    // The plan row lock queues concurrent board changes to one plan on PostgreSQL, across instances; the version
    // check then sees every earlier change.
    const plan = await SeasonPlan.findOne({
      where: { id: planId, ownerId },
      transaction,
      lock: transaction.LOCK.UPDATE,
    });
    if (!plan) throw new DomainError("not_found", "No plan with this id is yours.");
    if (op.version !== undefined && op.version !== plan.version)
      throw new DomainError(
        "stale",
        "This plan was changed elsewhere (another tab or person). The board has been reloaded; try again.",
        { version: plan.version },
      );
    let touchedItem: number | null = null;
    switch (op.op) {
      case "copy": {
        await week(planId, op.toWeek, transaction);
        const ids = await slotIds(op.toWeek, op.toDay, transaction);
        const { session, blocks } = shelfSession!;
        const item = await PlanItem.create(
          {
            planId,
            weekId: op.toWeek,
            day: op.toDay,
            position: 1000 + ids.length,
            sourceSessionId: session.id,
            name: session.name,
            sport: session.sport,
            testProtocol: session.testProtocol,
            blocks,
            description: session.description,
          },
          { transaction },
        );
        ids.splice(Math.min(op.toIndex, ids.length), 0, item.id);
        await writeOrder(op.toWeek, op.toDay, ids, transaction);
        touchedItem = item.id;
        break;
      }
      case "move": {
        const item = await PlanItem.findOne({ where: { id: op.itemId, planId }, transaction });
        if (!item) throw new DomainError("not_found", "That session is no longer on this plan.");
        await week(planId, op.toWeek, transaction);
        const from = { weekId: item.weekId, day: item.day };
        const ids = await slotIds(op.toWeek, op.toDay, transaction, item.id);
        ids.splice(Math.min(op.toIndex, ids.length), 0, item.id);
        await writeOrder(op.toWeek, op.toDay, ids, transaction);
        if (from.weekId !== op.toWeek || from.day !== op.toDay)
          await writeOrder(from.weekId, from.day, await slotIds(from.weekId, from.day, transaction), transaction);
        touchedItem = item.id;
        break;
      }
      case "remove": {
        const item = await PlanItem.findOne({ where: { id: op.itemId, planId }, transaction });
        if (!item) throw new DomainError("not_found", "That session is no longer on this plan.");
        await item.destroy({ transaction });
        await writeOrder(item.weekId, item.day, await slotIds(item.weekId, item.day, transaction), transaction);
        break;
      }
      case "duplicate-week":
      case "move-week": {
        if (op.fromWeek === op.toWeek) throw new DomainError("invalid", "Choose a different week.");
        await week(planId, op.fromWeek, transaction);
        await week(planId, op.toWeek, transaction);
        const source = await PlanItem.findAll({
          where: { weekId: op.fromWeek },
          order: [
            ["day", "ASC"],
            ["position", "ASC"],
          ],
          transaction,
        });
        for (const item of source) {
          const ids = await slotIds(op.toWeek, item.day, transaction);
          if (op.op === "move-week") {
            await item.update({ weekId: op.toWeek, position: 1000 + ids.length }, { transaction });
            ids.push(item.id);
          } else {
            const copy = await PlanItem.create(
              {
                planId,
                weekId: op.toWeek,
                day: item.day,
                position: 1000 + ids.length,
                sourceSessionId: item.sourceSessionId,
                name: item.name,
                sport: item.sport,
                testProtocol: item.testProtocol,
                blocks: item.blocks,
                timeOfDay: item.timeOfDay,
                notes: item.notes,
                description: item.description,
              },
              { transaction },
            );
            ids.push(copy.id);
          }
          await writeOrder(op.toWeek, item.day, ids, transaction);
        }
        break;
      }
      case "note": {
        const [n] = await PlanItem.update(
          { notes: op.notes.trim() },
          { where: { id: op.itemId, planId }, transaction },
        );
        if (n !== 1) throw new DomainError("not_found", "That session is no longer on this plan.");
        touchedItem = op.itemId;
        break;
      }
      case "time": {
        const [n] = await PlanItem.update(
          { timeOfDay: op.timeOfDay },
          { where: { id: op.itemId, planId }, transaction },
        );
        if (n !== 1) throw new DomainError("not_found", "That session is no longer on this plan.");
        touchedItem = op.itemId;
        break;
      }
    }
    await bumpVersion(planId, transaction);
    const items = await PlanItem.findAll({
      where: { planId },
      order: [
        ["day", "ASC"],
        ["position", "ASC"],
      ],
      transaction,
    });
    return { version: plan.version + 1, items: items.map(itemView), touchedItem };
  });
}

/**
 * The board page's data: the plan's heading fields, its weeks and one compact card per placed session, with the
 * distinct block lists turned into shapes (profile, duration, load, minutes per band in the coach's power bands).
 * Descriptions, recurrences and the blocks themselves stay on the server until a card is opened. The items are read
 * raw: their blocks arrive as JSON text, and cards with the same text share one parse and one estimate.
 */
export async function loadBoard(coach: Pick<User, "id" | "role">, planId: number) {
  const plan = await requirePlan(coach.id, planId);
  const [weeks, items, assignments, bands] = await Promise.all([
    db().query<{
      id: number;
      idx: number;
      phase: string;
      recovery: boolean | number;
      test: boolean | number;
      planned_hours: number;
    }>("SELECT id, idx, phase, recovery, test, planned_hours FROM plan_weeks WHERE plan_id = ? ORDER BY idx", {
      replacements: [planId],
      type: QueryTypes.SELECT,
    }),
    db().query<{
      id: number;
      week_id: number;
      day: number;
      position: number;
      name: string;
      test_protocol: string | null;
      blocks: string | Block[];
      time_of_day: string | null;
      notes: string | null;
    }>(
      "SELECT id, week_id, day, position, name, test_protocol, blocks, time_of_day, notes FROM plan_items WHERE plan_id = ? ORDER BY day, position",
      { replacements: [planId], type: QueryTypes.SELECT },
    ),
    db().query<{ plan_version: number }>("SELECT plan_version FROM assignments WHERE plan_id = ?", {
      replacements: [planId],
      type: QueryTypes.SELECT,
    }),
    bandSetFor(coach, "bike", "power"),
  ]);
  const view = boardView(
    items.map((i) => ({
      id: i.id,
      weekId: i.week_id,
      day: i.day,
      position: i.position,
      name: i.name,
      testProtocol: i.test_protocol,
      blocks: i.blocks,
      timeOfDay: i.time_of_day,
      notes: i.notes,
    })),
    bands.bands,
  );
  return {
    plan: { id: plan.id, name: plan.name, startDate: plan.startDate, version: plan.version },
    weeks: weeks.map((w) => ({
      id: w.id,
      idx: w.idx,
      phase: w.phase,
      recovery: Boolean(w.recovery),
      test: Boolean(w.test),
      plannedHours: Number(w.planned_hours),
    })),
    ...view,
    assigned: assignments.length,
    outdated: assignments.filter((a) => Number(a.plan_version) < plan.version).length,
  };
}

/** One placed session in full, for the board's drawer when a card opens. */
export async function boardItemDetail(ownerId: number, planId: number, itemId: number) {
  await requirePlan(ownerId, planId);
  const item =
    Number.isInteger(itemId) && itemId > 0 ? await PlanItem.findOne({ where: { id: itemId, planId } }) : null;
  if (!item) throw new DomainError("not_found", "That session is no longer on this plan.");
  return itemView(item);
}
