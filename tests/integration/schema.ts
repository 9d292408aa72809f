import { QueryTypes } from "sequelize";
import { db, dialect } from "~/.server/db";

/** Catalog questions the tests ask, answered from each database's own catalog. */
const q = <T extends object>(sql: string) => db().query<T>(sql, { type: QueryTypes.SELECT });

export async function tableNames(): Promise<string[]> {
  if (dialect() === "postgres") {
    return (
      await q<{ name: string }>(
        "SELECT tablename AS name FROM pg_tables WHERE schemaname = current_schema() ORDER BY tablename",
      )
    ).map((r) => r.name);
  }
  return (
    await q<{ name: string }>("SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%'")
  ).map((r) => r.name);
}

/** `table.column` for every foreign-key column that no index leads. */
export async function unindexedForeignKeys(): Promise<string[]> {
  if (dialect() === "postgres") {
    const rows = await q<{ tbl: string; col: string }>(
      `SELECT cl.relname AS tbl, a.attname AS col
       FROM pg_constraint c JOIN pg_class cl ON cl.oid = c.conrelid
       JOIN pg_attribute a ON a.attrelid = c.conrelid AND a.attnum = c.conkey[1]
       WHERE c.contype = 'f' AND cl.relnamespace = current_schema()::regnamespace
         AND NOT EXISTS (SELECT 1 FROM pg_index i WHERE i.indrelid = c.conrelid AND i.indkey[0] = c.conkey[1])`,
    );
    return rows.map((r) => `${r.tbl}.${r.col}`).sort();
  }
  const missing: string[] = [];
  for (const table of await tableNames()) {
    const fks = await q<{ id: number; seq: number; from: string }>(`PRAGMA foreign_key_list("${table}")`);
    const leading = new Set<string>();
    for (const ix of await q<{ name: string }>(`PRAGMA index_list("${table}")`)) {
      const cols = await q<{ seqno: number; name: string }>(`PRAGMA index_info("${ix.name}")`);
      const first = cols.find((c) => c.seqno === 0);
      if (first) leading.add(first.name);
    }
    // An INTEGER PRIMARY KEY is the table's own index.
    for (const col of await q<{ name: string; pk: number }>(`PRAGMA table_info("${table}")`))
      if (col.pk === 1) leading.add(col.name);
    for (const fk of fks.filter((f) => f.seq === 0)) if (!leading.has(fk.from)) missing.push(`${table}.${fk.from}`);
  }
  return missing.sort();
}

/** A trigger that aborts every update of `column` on `table` where `when` (an SQL condition on NEW) holds. */
export async function injectUpdateFault(name: string, table: string, column: string, when: string, message: string) {
  if (dialect() === "postgres") {
    await db().query(
      `CREATE FUNCTION ${name}() RETURNS trigger LANGUAGE plpgsql AS $$ BEGIN IF ${when} THEN RAISE EXCEPTION '${message}'; END IF; RETURN NEW; END $$`,
    );
    await db().query(
      `CREATE TRIGGER ${name} BEFORE UPDATE OF ${column} ON ${table} FOR EACH ROW EXECUTE FUNCTION ${name}()`,
    );
    return async () => {
      await db().query(`DROP TRIGGER ${name} ON ${table}`);
      await db().query(`DROP FUNCTION ${name}()`);
    };
  }
  await db().query(
    `CREATE TRIGGER ${name} BEFORE UPDATE OF ${column} ON ${table} WHEN ${when} BEGIN SELECT RAISE(ABORT, '${message}'); END;`,
  );
  return async () => {
    await db().query(`DROP TRIGGER ${name}`);
  };
}
