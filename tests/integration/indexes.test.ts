import { QueryTypes } from "sequelize";
import { describe, expect, it } from "vitest";
import { db } from "~/.server/db";

/**
 * Every foreign-key column leads some index. Without one, deleting or updating a parent row scans the whole child
 * table (SQLite checks each child for the ON DELETE action), and joins from parent to child do the same.
 */
export async function unindexedForeignKeys(): Promise<string[]> {
  const q = <T extends object>(sql: string) => db().query<T>(sql, { type: QueryTypes.SELECT });
  const tables = (await q<{ name: string }>("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%'")).map((t) => t.name);
  const missing: string[] = [];
  for (const table of tables) {
    const fks = await q<{ id: number; seq: number; from: string }>(`PRAGMA foreign_key_list("${table}")`);
    const leading = new Set<string>();
    for (const ix of await q<{ name: string }>(`PRAGMA index_list("${table}")`)) {
      const cols = await q<{ seqno: number; name: string }>(`PRAGMA index_info("${ix.name}")`);
      const first = cols.find((c) => c.seqno === 0);
      if (first) leading.add(first.name);
    }
    // An INTEGER PRIMARY KEY is the table's own index.
    for (const col of await q<{ name: string; pk: number }>(`PRAGMA table_info("${table}")`)) if (col.pk === 1) leading.add(col.name);
    for (const fk of fks.filter((f) => f.seq === 0)) if (!leading.has(fk.from)) missing.push(`${table}.${fk.from}`);
  }
  return missing.sort();
}

describe("indexes", () => {
  it("has an index led by every foreign-key column", async () => {
    expect(await unindexedForeignKeys()).toEqual([]);
  });
});
