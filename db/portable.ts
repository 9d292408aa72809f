import { QueryTypes, type QueryInterface } from "sequelize";

/**
 * The few schema pieces that SQLite and PostgreSQL spell differently. Migrations call these so that one migration
 * builds the same rules on both; on SQLite each helper emits exactly what the migrations emitted before, because
 * databases that are already migrated keep that schema.
 */
export const isPostgres = (qi: QueryInterface) => qi.sequelize.getDialect() === "postgres";

/** A text column that compares case-insensitively (SQLite's NOCASE). On PostgreSQL see uniqueLower. */
export const caseInsensitiveText = (qi: QueryInterface) => (isPostgres(qi) ? "TEXT" : "TEXT COLLATE NOCASE");

/** PostgreSQL's counterpart of a UNIQUE NOCASE column: a unique index on lower(column). No-op on SQLite. */
export async function uniqueLower(qi: QueryInterface, table: string, column: string) {
  if (!isPostgres(qi)) return;
  await qi.sequelize.query(`CREATE UNIQUE INDEX "${table}_${column}_lower" ON "${table}" (lower("${column}"))`);
}

/**
 * A rule checked before each insert that aborts with `message` (SQLite: a trigger with RAISE; PostgreSQL: a
 * PL/pgSQL trigger function), so both report the same error text. `failsWhen` is an SQL condition on NEW.
 */
export async function insertGuard(qi: QueryInterface, name: string, table: string, failsWhen: string, message: string) {
  if (isPostgres(qi)) {
    await qi.sequelize.query(
      `CREATE FUNCTION ${name}() RETURNS trigger LANGUAGE plpgsql AS $$ BEGIN IF ${failsWhen} THEN RAISE EXCEPTION '${message}'; END IF; RETURN NEW; END $$`,
    );
    await qi.sequelize.query(
      `CREATE TRIGGER ${name} BEFORE INSERT ON ${table} FOR EACH ROW EXECUTE FUNCTION ${name}()`,
    );
    return;
  }
  await qi.sequelize.query(
    `CREATE TRIGGER ${name} BEFORE INSERT ON ${table} WHEN ${failsWhen} BEGIN SELECT RAISE(ABORT, '${message}'); END;`,
  );
}

export async function dropInsertGuard(qi: QueryInterface, name: string, table: string) {
  if (isPostgres(qi)) {
    await qi.sequelize.query(`DROP TRIGGER IF EXISTS ${name} ON ${table}`);
    await qi.sequelize.query(`DROP FUNCTION IF EXISTS ${name}()`);
    return;
  }
  await qi.sequelize.query(`DROP TRIGGER IF EXISTS ${name}`);
}

/**
 * Drops a column (for `down` steps). Sequelize's SQLite removeColumn rebuilds the table from describeTable, which
 * turns a column of a composite unique index into a unique column of its own and loses every index; SQLite's own
 * ALTER TABLE … DROP COLUMN (3.35+) keeps the table, and refuses only while an index covers the column, so those
 * indexes go first. PostgreSQL drops them with the column.
 */
export async function dropColumn(qi: QueryInterface, table: string, column: string) {
  if (isPostgres(qi)) {
    await qi.removeColumn(table, column);
    return;
  }
  const indexes = await qi.sequelize.query<{ name: string }>(
    "SELECT name FROM sqlite_master WHERE type = 'index' AND tbl_name = ? AND sql IS NOT NULL",
    { replacements: [table], type: QueryTypes.SELECT },
  );
  for (const { name } of indexes) {
    const columns = await qi.sequelize.query<{ name: string }>(`PRAGMA index_info(\`${name}\`)`, {
      type: QueryTypes.SELECT,
    });
    if (columns.some((c) => c.name === column)) await qi.sequelize.query(`DROP INDEX \`${name}\``);
  }
  await qi.sequelize.query(`ALTER TABLE \`${table}\` DROP COLUMN \`${column}\``);
}
