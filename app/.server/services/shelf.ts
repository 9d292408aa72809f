import fs from "node:fs/promises";
import path from "node:path";
import { literal, Op, QueryTypes, type Transaction } from "sequelize";
import { db, dialect, writeTransaction } from "../db";
import { PlanItem, ShelfSession, ShelfBlock } from "../models";
import { describeIssues, EXPORT_FORMAT, exportSchema, sessionSchema, type SessionInput } from "~/lib/sessions";
import { blockDuration, expandBlocks, type Block } from "~/lib/training";
import { DomainError } from "../errors";

export interface ShelfSessionSummary {
  id: number;
  name: string;
  sport: string;
  description: string;
  tags: string[];
  testProtocol: string | null;
  archived: boolean;
  durationS: number;
  blockCount: number;
  /** Steps for the small profile: start, length and the middle of the target (null when untargeted). */
  profile: { s: number; d: number; lo: number | null; hi: number | null; ramp: boolean }[];
  usedIn: number;
  updatedAt: string;
}

export function profileOf(blocks: Block[]): ShelfSessionSummary["profile"] {
  return expandBlocks(blocks).map((s) => ({ s: s.startS, d: s.durationS, lo: s.lowPct, hi: s.highPct, ramp: s.ramp }));
}

async function blocksByShelfSession(ids: number[], transaction?: Transaction): Promise<Map<number, Block[]>> {
  const map = new Map<number, Block[]>();
  if (ids.length === 0) return map;
  const rows = await ShelfBlock.findAll({
    where: { sessionId: ids },
    order: [
      ["sessionId", "ASC"],
      ["position", "ASC"],
    ],
    transaction,
  });
  for (const r of rows) {
    const list = map.get(r.sessionId) ?? [];
    list.push(r.spec as Block);
    map.set(r.sessionId, list);
  }
  return map;
}

export type ShelfQuery = {
  q?: string;
  sport?: string;
  tag?: string;
  sort?: "name" | "updated" | "duration";
  archived?: boolean;
};

/** Every tag on the coach's shelf (archived sessions included), for the filter's choices whatever is shown. */
export async function listShelfTags(ownerId: number): Promise<string[]> {
  const rows = await ShelfSession.findAll({ where: { ownerId }, attributes: ["tags"] });
  return Array.from(new Set(rows.flatMap((r) => r.tags))).sort();
}

export async function listShelfSessions(ownerId: number, query: ShelfQuery = {}): Promise<ShelfSessionSummary[]> {
  const where: Record<string | symbol, unknown> = { ownerId, archived: query.archived ?? false };
  if (query.sport) where.sport = query.sport;
  let replacements: Record<string, string> | undefined;
  if (query.q) {
    // `%`, `_` and the escape character itself are matched literally; LIKE honours the backslash only with an
    // explicit ESCAPE clause (SQLite and PostgreSQL alike). SQLite's LIKE ignores ASCII case; on PostgreSQL ILIKE does.
    replacements = { like: `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%` };
    const like = dialect() === "postgres" ? "ILIKE" : "LIKE";
    where[Op.and] = [
      literal(
        `(name ${like} :like ESCAPE '\\' OR description ${like} :like ESCAPE '\\' OR tags ${like} :like ESCAPE '\\')`,
      ),
    ];
  }
  const sessions = await ShelfSession.findAll({ where, order: [["name", "ASC"]], replacements });
  const filtered = query.tag ? sessions.filter((s) => s.tags.includes(query.tag!.toLowerCase())) : sessions;
  const ids = filtered.map((s) => s.id);
  const blocks = await blocksByShelfSession(ids);
  const usage = ids.length
    ? await db().query<{ id: number; n: number }>(
        `SELECT source_session_id AS id, COUNT(*) AS n FROM plan_items WHERE source_session_id IN (${ids.map(() => "?").join(",")}) GROUP BY source_session_id`,
        { replacements: ids, type: QueryTypes.SELECT },
      )
    : [];
  const used = new Map(usage.map((u) => [u.id, u.n]));
  const out = filtered.map((s) => {
    const b = blocks.get(s.id) ?? [];
    return {
      id: s.id,
      name: s.name,
      sport: s.sport,
      description: s.description,
      tags: s.tags,
      testProtocol: s.testProtocol,
      archived: s.archived,
      durationS: b.reduce((t, x) => t + blockDuration(x), 0),
      blockCount: b.length,
      profile: profileOf(b),
      usedIn: used.get(s.id) ?? 0,
      updatedAt: s.updatedAt.toISOString(),
    };
  });
  if (query.sort === "updated") out.sort((a, b) => b.updatedAt.localeCompare(a.updatedAt));
  if (query.sort === "duration") out.sort((a, b) => a.durationS - b.durationS);
  return out;
}

/** A coach's own session with its blocks, or null: another coach's session is indistinguishable from none. */
export async function getShelfSession(ownerId: number, id: number) {
  if (!Number.isInteger(id) || id <= 0) return null;
  const session = await ShelfSession.findOne({ where: { id, ownerId } });
  if (!session) return null;
  const blocks = (await blocksByShelfSession([id])).get(id) ?? [];
  const usedIn = await PlanItem.count({ where: { sourceSessionId: id } });
  return { session, blocks, usedIn };
}

async function writeBlocks(sessionId: number, blocks: Block[], transaction: Transaction) {
  await ShelfBlock.destroy({ where: { sessionId }, transaction });
  await ShelfBlock.bulkCreate(
    blocks.map((spec, position) => ({ sessionId, position, kind: spec.kind, spec })),
    { transaction },
  );
}

export async function createShelfSession(
  ownerId: number,
  input: SessionInput,
  transaction?: Transaction,
): Promise<ShelfSession> {
  const run = async (t: Transaction) => {
    const session = await ShelfSession.create(
      {
        ownerId,
        name: input.name,
        sport: input.sport,
        description: input.description,
        tags: input.tags,
        testProtocol: input.testProtocol ?? null,
      },
      { transaction: t },
    );
    await writeBlocks(session.id, input.blocks as Block[], t);
    return session;
  };
  return transaction ? run(transaction) : writeTransaction(run);
}

export async function updateShelfSession(
  ownerId: number,
  id: number,
  input: SessionInput,
): Promise<ShelfSession | null> {
  return writeTransaction(async (transaction) => {
    const session = await ShelfSession.findOne({ where: { id, ownerId }, transaction });
    if (!session) return null;
    await session.update(
      { name: input.name, sport: input.sport, description: input.description, tags: input.tags },
      { transaction },
    );
    await writeBlocks(id, input.blocks as Block[], transaction);
    return session;
  });
}

export async function duplicateShelfSession(ownerId: number, id: number): Promise<ShelfSession | null> {
  const found = await getShelfSession(ownerId, id);
  if (!found) return null;
  const { session, blocks } = found;
  return createShelfSession(ownerId, {
    name: `${session.name} (copy)`.slice(0, 120),
    sport: session.sport as SessionInput["sport"],
    description: session.description,
    tags: session.tags,
    testProtocol: session.testProtocol,
    blocks,
  });
}

/** Deletes a session nobody uses; one that a plan uses is archived instead, so plans keep their history. */
export async function removeShelfSession(ownerId: number, id: number): Promise<"deleted" | "archived" | null> {
  return writeTransaction(async (transaction) => {
    const session = await ShelfSession.findOne({ where: { id, ownerId }, transaction });
    if (!session) return null;
    const used = await PlanItem.count({ where: { sourceSessionId: id }, transaction });
    if (used > 0) {
      await session.update({ archived: true }, { transaction });
      return "archived";
    }
    await session.destroy({ transaction });
    return "deleted";
  });
}

export async function setArchived(ownerId: number, id: number, archived: boolean): Promise<boolean> {
  const [n] = await ShelfSession.update({ archived }, { where: { id, ownerId } });
  return n === 1;
}

export async function exportShelfSessions(ownerId: number) {
  const sessions = await ShelfSession.findAll({ where: { ownerId }, order: [["name", "ASC"]] });
  const blocks = await blocksByShelfSession(sessions.map((s) => s.id));
  return {
    format: EXPORT_FORMAT,
    version: 1 as const,
    exportedAt: new Date().toISOString(),
    sessions: sessions.map((s) => ({
      name: s.name,
      sport: s.sport,
      description: s.description,
      tags: s.tags,
      ...(s.testProtocol ? { testProtocol: s.testProtocol } : {}),
      blocks: blocks.get(s.id) ?? [],
    })),
  };
}

/** Reads a session file; every session must be valid or nothing is imported. */
export function parseShelfSessionFile(text: string): SessionInput[] {
  let json: unknown;
  try {
    json = JSON.parse(text);
  } catch {
    throw new DomainError("invalid", "The file is not valid JSON.");
  }
  const head = exportSchema.safeParse(json);
  if (!head.success)
    throw new DomainError("invalid", "The file could not be imported.", { details: describeIssues(head.error) });
  const out: SessionInput[] = [];
  const problems: string[] = [];
  head.data.sessions.forEach((raw, i) => {
    const parsed = sessionSchema.safeParse(raw);
    if (parsed.success) out.push(parsed.data);
    else problems.push(...describeIssues(parsed.error, `session ${i + 1}: `));
  });
  if (problems.length)
    throw new DomainError("invalid", "Nothing was imported: some sessions are not valid.", {
      details: problems.slice(0, 10),
    });
  return out;
}

export async function importShelfSessions(ownerId: number, text: string, transaction?: Transaction): Promise<number> {
  const sessions = parseShelfSessionFile(text);
  const run = async (t: Transaction) => {
    for (const s of sessions) await createShelfSession(ownerId, s, t);
    return sessions.length;
  };
  return transaction ? run(transaction) : writeTransaction(run);
}

const STARTER = path.resolve("templates/sessions/starter.json");

/** A new coach's shelf starts with our starter sessions. */
export async function copyStarterShelf(ownerId: number, transaction: Transaction) {
  return importShelfSessions(ownerId, await fs.readFile(STARTER, "utf8"), transaction);
}
