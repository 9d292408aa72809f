import { QueryTypes, type QueryInterface } from "sequelize";
import { Listing, SeasonPlan, User } from "../../app/.server/models";
import { createListing } from "../../app/.server/services/shop";
import { DEMO_ACCOUNTS } from "../demo/accounts";

/** The demo coach sells the demo season plan in the shop (invented price). */
export async function up({ context: qi }: { context: QueryInterface }) {
  const coach = await User.findOne({ where: { email: DEMO_ACCOUNTS.people[1].email } });
  const plan = coach
    ? await SeasonPlan.findOne({ where: { ownerId: coach.id, name: "Harbour Line spring build" } })
    : null;
  if (!coach || !plan) return;
  const [{ n }] = await qi.sequelize.query<{ n: number }>("SELECT COUNT(*) AS n FROM listings WHERE plan_id = ?", {
    replacements: [plan.id],
    type: QueryTypes.SELECT,
  });
  if (n > 0) return;
  const listing = await createListing(coach, {
    planId: plan.id,
    title: "Twelve-week road build",
    description:
      "Aerobic base into threshold and capacity work, with a recovery week every fourth week and field tests to keep your targets right.",
    level: "intermediate",
    priceCents: 3900,
    coverText: "Base to threshold in twelve weeks, retested along the way.",
    currency: "EUR",
  });
  await Listing.update({ published: true }, { where: { id: listing.id } });
}

export async function down({ context: qi }: { context: QueryInterface }) {
  await qi.sequelize.query("DELETE FROM listings WHERE title = 'Twelve-week road build'");
}
