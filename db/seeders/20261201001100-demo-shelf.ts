import { QueryTypes, type QueryInterface } from "sequelize";
import { writeTransaction } from "../../app/.server/db";
import { copyStarterShelf } from "../../app/.server/services/shelf";
import { DEMO_ACCOUNTS } from "../demo/accounts";

/** The demo coach's shelf: our starter sessions. */
export async function up({ context: qi }: { context: QueryInterface }) {
  const [coach] = await qi.sequelize.query<{ id: number }>("SELECT id FROM users WHERE email = ?", {
    replacements: [DEMO_ACCOUNTS.people[1].email],
    type: QueryTypes.SELECT,
  });
  if (!coach) return;
  const [{ n }] = await qi.sequelize.query<{ n: number }>("SELECT COUNT(*) AS n FROM sessions WHERE owner_id = ?", {
    replacements: [coach.id],
    type: QueryTypes.SELECT,
  });
  if (n > 0) return;
  await writeTransaction((t) => copyStarterShelf(coach.id, t));
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query("DELETE FROM sessions WHERE owner_id IN (SELECT id FROM users WHERE email = ?)", {
    replacements: [DEMO_ACCOUNTS.people[1].email],
  });
}
