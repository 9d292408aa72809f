import { QueryTypes, type QueryInterface } from "sequelize";
import { describe, expect, it } from "vitest";
import { db, dialect } from "~/.server/db";
import { tableNames } from "./schema";
import { downInTransaction, migrator, moveSeederRecords, rollback, seeder } from "../../db/migrator";
import { dropColumn } from "../../db/portable";
import { DEMO_ACCOUNTS } from "../../db/demo/accounts";

const tables = tableNames;
const T = "'2026-01-01 00:00:00.000 +00:00'";

describe("migrations and demo data", () => {
  it("runs every migration down and up again", async () => {
    const executed = (await migrator().executed()).length;
    expect(executed).toBeGreaterThan(0);
    await migrator().down({ to: 0 });
    expect((await tables()).filter((t) => t !== "schema_migrations")).toEqual([]);
    await migrator().up();
    expect((await migrator().executed()).length).toBe(executed);
    expect(await tables()).toEqual(
      expect.arrayContaining([
        "users",
        "auth_sessions",
        "coach_athletes",
        "invitations",
        "password_resets",
        "outbound_emails",
      ]),
    );
  });

  it("uses WAL (SQLite), enforces foreign keys, and keeps e-mail unique whatever its case", async () => {
    if (dialect() === "sqlite") {
      const [mode] = await db().query<{ journal_mode: string }>("PRAGMA journal_mode", { type: QueryTypes.SELECT });
      expect(mode.journal_mode).toBe("wal");
    }
    await expect(
      db().query(
        `INSERT INTO coach_athletes (coach_id, athlete_id, created_at, updated_at) VALUES (999999, 999998, ${T}, ${T})`,
      ),
    ).rejects.toThrow(/FOREIGN KEY/i);
    await db().query(
      `INSERT INTO users (role, email, password_hash, name, timezone, units, created_at, updated_at) VALUES ('athlete', 'Case@Example.test', 'h', 'n', 'UTC', 'metric', ${T}, ${T})`,
    );
    await expect(
      db().query(
        `INSERT INTO users (role, email, password_hash, name, timezone, units, created_at, updated_at) VALUES ('athlete', 'case@example.TEST', 'h', 'n', 'UTC', 'metric', ${T}, ${T})`,
      ),
    ).rejects.toMatchObject({ name: "SequelizeUniqueConstraintError" });
    await expect(
      db().query(
        `INSERT INTO users (role, email, password_hash, name, timezone, units, created_at, updated_at) VALUES ('owner', 'role@example.test', 'h', 'n', 'UTC', 'metric', ${T}, ${T})`,
      ),
    ).rejects.toMatchObject({ original: expect.objectContaining({ message: expect.stringMatching(/invalid role/) }) });
  });

  it("seeds the demo studio once; running the seeders again adds nothing", async () => {
    await seeder().up();
    const count = async () =>
      (
        await db().query<{ n: number }>("SELECT COUNT(*) AS n FROM users WHERE email LIKE '%@harbourline.example'", {
          type: QueryTypes.SELECT,
        })
      )[0].n;
    expect(await count()).toBe(DEMO_ACCOUNTS.people.length);
    await seeder().up();
    expect(await count()).toBe(DEMO_ACCOUNTS.people.length);
    const [links] = await db().query<{ n: number }>(
      "SELECT COUNT(*) AS n FROM coach_athletes ca JOIN users c ON c.id = ca.coach_id WHERE c.email = ?",
      { replacements: [DEMO_ACCOUNTS.people[1].email], type: QueryTypes.SELECT },
    );
    expect(links.n).toBe(3);
  });

  it("rolls a seeded database all the way down and up again, and seeds the demo data again", async () => {
    const demoUsers = async () =>
      (
        await db().query<{ n: number }>("SELECT COUNT(*) AS n FROM users WHERE email LIKE '%@harbourline.example'", {
          type: QueryTypes.SELECT,
        })
      )[0].n;
    await seeder().up();
    expect(await demoUsers()).toBe(DEMO_ACCOUNTS.people.length);
    const seeded = (await seeder().executed()).map((m) => m.name);
    expect(seeded.length).toBeGreaterThan(0);
    // Seeders are recorded apart from the migrations.
    expect((await migrator().executed()).map((m) => m.name)).not.toEqual(expect.arrayContaining([seeded[0]]));
    const migrations = (await migrator().executed()).length;

    await rollback({ to: 0 });
    expect((await tables()).filter((t) => t !== "schema_migrations")).toEqual([]);
    expect(await migrator().executed()).toEqual([]);

    await migrator().up();
    expect((await migrator().executed()).length).toBe(migrations);
    expect(await demoUsers()).toBe(0);
    await seeder().up();
    expect((await seeder().executed()).map((m) => m.name)).toEqual(seeded);
    expect(await demoUsers()).toBe(DEMO_ACCOUNTS.people.length);
    const [plans] = await db().query<{ n: number }>("SELECT COUNT(*) AS n FROM season_plans", {
      type: QueryTypes.SELECT,
    });
    expect(plans.n).toBeGreaterThan(0);
  });

  it("rolls back one step on a seeded database and keeps the rows of the columns that stay", async () => {
    const before = await db().query<{ id: number; email: string }>("SELECT id, email FROM users ORDER BY id", {
      type: QueryTypes.SELECT,
    });
    const executed = (await migrator().executed()).map((m) => m.name);
    await rollback();
    expect((await migrator().executed()).map((m) => m.name)).toEqual(executed.slice(0, -1));
    expect(await db().query("SELECT id, email FROM users ORDER BY id", { type: QueryTypes.SELECT })).toEqual(before);
    await migrator().up();
    expect((await migrator().executed()).map((m) => m.name)).toEqual(executed);
  });

  it("moves seeder records left in schema_migrations by older versions to schema_seeds", async () => {
    const seeded = (await seeder().executed()).map((m) => m.name);
    // An older database: the seeders' names sat in the migrations table and schema_seeds did not exist.
    for (const name of seeded) {
      await db().query("INSERT INTO schema_migrations (name) VALUES (?)", { replacements: [name] });
    }
    await db().getQueryInterface().dropTable("schema_seeds");
    await moveSeederRecords();
    expect((await seeder().executed()).map((m) => m.name)).toEqual(seeded);
    expect((await migrator().executed()).map((m) => m.name)).not.toEqual(expect.arrayContaining([seeded[0]]));
    await moveSeederRecords();
    expect((await seeder().executed()).map((m) => m.name)).toEqual(seeded);
  });

  it("leaves the database as it was when a down step fails halfway", async () => {
    const last = (await migrator().executed()).at(-1)!.name;
    const columns = async () => Object.keys(await db().getQueryInterface().describeTable("users")).sort();
    const before = await columns();
    expect(before).toContain("training_times");
    const failing = async ({ context: qi }: { context: QueryInterface }) => {
      await dropColumn(qi, "users", "training_times");
      throw new Error("second statement failed");
    };
    await expect(downInTransaction(db(), last, failing)).rejects.toThrow("second statement failed");
    expect(await columns()).toEqual(before);
    expect((await migrator().executed()).at(-1)!.name).toBe(last);
  });
});
