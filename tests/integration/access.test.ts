import { beforeAll, describe, expect, it } from "vitest";
import { athleteFor, commentFor, orderFor, planFor, scheduledSessionFor, uploadFor } from "~/.server/access";
import {
  CoachAthlete,
  Listing,
  Order,
  ScheduledSession,
  SeasonPlan,
  SessionComment,
  Upload,
  type User,
} from "~/.server/models";
import * as athleteLoad from "~/routes/api/athlete-load";
import * as rideApi from "~/routes/api/ride";
import * as planPage from "~/routes/coach/plan";
import * as coachSession from "~/routes/coach/athlete-session";
import * as athleteSession from "~/routes/athlete/session";
import * as orderPage from "~/routes/shop/order";
import { getRequest, makeUser, run, signIn, statusOf } from "./helpers";

// Who may see which record. "owner" is the athlete a record is about (for a plan: the coach who wrote it; for an
// order: the buyer), "their coach" coaches that athlete (for an order: the coach who sells the listing).
type Who = "owner" | "their coach" | "another coach" | "another athlete" | "admin";
const WHO: Who[] = ["owner", "their coach", "another coach", "another athlete", "admin"];

let people: Record<Who, User>;
let cookies: Record<Who, string>;
let ids: { athlete: number; plan: number; session: number; comment: number; upload: number; order: number };

beforeAll(async () => {
  const owner = await makeUser({ role: "athlete", name: "Owner" });
  const coach = await makeUser({ role: "coach", name: "Their coach" });
  const otherCoach = await makeUser({ role: "coach", name: "Another coach" });
  const otherAthlete = await makeUser({ role: "athlete", name: "Another athlete" });
  const admin = await makeUser({ role: "admin", name: "Admin" });
  await CoachAthlete.create({ coachId: coach.id, athleteId: owner.id });
  // The other coach has an athlete of their own, so "coaches someone" is never mistaken for "coaches this one".
  await CoachAthlete.create({ coachId: otherCoach.id, athleteId: otherAthlete.id });
  people = { owner, "their coach": coach, "another coach": otherCoach, "another athlete": otherAthlete, admin };
  cookies = Object.fromEntries(
    await Promise.all(WHO.map(async (w) => [w, await signIn(people[w].email)] as const)),
  ) as Record<Who, string>;

  const plan = await SeasonPlan.create({
    ownerId: coach.id,
    name: "Base",
    sport: "bike",
    alignment: "start",
    startDate: "2027-01-04",
    weeklyHours: 8,
    pattern: "3:1",
    testEveryWeeks: 6,
  });
  const session = await ScheduledSession.create({
    athleteId: owner.id,
    date: "2027-01-05",
    name: "Tempo",
    sport: "bike",
    plannedDurationS: 3600,
  });
  const comment = await SessionComment.create({
    scheduledSessionId: session.id,
    authorId: owner.id,
    body: "Legs heavy.",
  });
  const upload = await Upload.create({
    athleteId: owner.id,
    uploadedBy: owner.id,
    originalName: "ride.csv",
    format: "csv",
    size: 10,
    storageKey: "missing/ride.csv",
    summary: {} as never,
  });
  const listing = await Listing.create({
    planId: plan.id,
    coachId: coach.id,
    slug: `base-${plan.id}`,
    title: "Base",
    description: "",
    sport: "bike",
    level: "beginner",
    weeks: 4,
    weeklyHours: 8,
    priceCents: 4900,
    currency: "EUR",
  } as never);
  const order = await Order.create({
    listingId: listing.id,
    buyerId: owner.id,
    amountCents: 4900,
    currency: "EUR",
    alignMode: "start",
    alignDate: "2027-01-04",
  } as never);
  ids = {
    athlete: owner.id,
    plan: plan.id,
    session: session.id,
    comment: comment.id,
    upload: upload.id,
    order: order.id,
  };
});

// The rule of each record kind, as a table: true = allowed, false = answered as missing.
const TABLE: [
  kind: keyof typeof ids,
  check: (viewer: User, id: number) => Promise<unknown>,
  allowed: Record<Who, boolean>,
][] = [
  [
    "athlete",
    athleteFor,
    { owner: true, "their coach": true, "another coach": false, "another athlete": false, admin: false },
  ],
  [
    "plan",
    planFor,
    { owner: false, "their coach": true, "another coach": false, "another athlete": false, admin: false },
  ],
  [
    "session",
    scheduledSessionFor,
    { owner: true, "their coach": true, "another coach": false, "another athlete": false, admin: false },
  ],
  [
    "comment",
    commentFor,
    { owner: true, "their coach": true, "another coach": false, "another athlete": false, admin: false },
  ],
  [
    "upload",
    uploadFor,
    { owner: true, "their coach": true, "another coach": false, "another athlete": false, admin: false },
  ],
  [
    "order",
    orderFor,
    { owner: true, "their coach": true, "another coach": false, "another athlete": false, admin: true },
  ],
];

describe("access rules: who sees which record", () => {
  for (const [kind, check, allowed] of TABLE) {
    it.each(WHO)(`${kind} · %s`, async (who) => {
      expect(Boolean(await check(people[who], ids[kind]))).toBe(allowed[who]);
    });
    it(`${kind} · an id that does not exist is missing for everyone`, async () => {
      for (const who of WHO) expect(await check(people[who], 987_654_321)).toBeNull();
    });
  }

  it("an order tells the buyer from the seller", async () => {
    expect((await orderFor(people.owner, ids.order))?.as).toBe("buyer");
    expect((await orderFor(people["their coach"], ids.order))?.as).toBe("seller");
    expect((await orderFor(people.admin, ids.order))?.as).toBe("seller");
  });
});

// The same rules through the routes: a record that is not yours answers 404; a page for another role stays 403.
describe("access through the routes", () => {
  const status = (who: Who, fn: (args: never) => Promise<unknown>, path: string, params: Record<string, string>) =>
    run(fn as never, getRequest(path, cookies[who]), params).then(statusOf);

  it.each<[Who, number]>([
    ["owner", 200],
    ["their coach", 200],
    ["another coach", 404],
    ["another athlete", 404],
    ["admin", 403],
  ])("athlete's load series · %s → %i", async (who, expected) => {
    expect(
      await status(who, athleteLoad.loader, `/api/athletes/${ids.athlete}/load?curve=0`, { id: String(ids.athlete) }),
    ).toBe(expected);
  });

  it.each<[Who, number]>([
    ["owner", 403],
    ["their coach", 200],
    ["another coach", 404],
    ["another athlete", 403],
    ["admin", 403],
  ])("plan page · %s → %i", async (who, expected) => {
    expect(await status(who, planPage.loader, `/coach/plans/${ids.plan}`, { planId: String(ids.plan) })).toBe(expected);
  });

  it.each<[Who, number]>([
    ["owner", 200],
    ["another athlete", 404],
  ])("athlete's session page · %s → %i", async (who, expected) => {
    expect(
      await status(who, athleteSession.loader, `/athlete/sessions/${ids.session}`, { id: String(ids.session) }),
    ).toBe(expected);
  });

  it("coach's session page: their coach 200, another coach 404, and the session must be the URL's athlete's", async () => {
    const path = `/coach/athletes/${ids.athlete}/sessions/${ids.session}`;
    expect(
      await status("their coach", coachSession.loader, path, {
        athleteId: String(ids.athlete),
        sessionId: String(ids.session),
      }),
    ).toBe(200);
    expect(
      await status("another coach", coachSession.loader, path, {
        athleteId: String(ids.athlete),
        sessionId: String(ids.session),
      }),
    ).toBe(404);
    // The other coach's own athlete in the URL does not open someone else's session.
    const theirs = String(people["another athlete"].id);
    expect(
      await status("another coach", coachSession.loader, `/coach/athletes/${theirs}/sessions/${ids.session}`, {
        athleteId: theirs,
        sessionId: String(ids.session),
      }),
    ).toBe(404);
  });

  it.each<[Who, number]>([
    ["another coach", 404],
    ["another athlete", 404],
    ["admin", 404],
  ])("ride file · %s → %i", async (who, expected) => {
    expect(
      await status(who, rideApi.loader, `/api/rides/${ids.upload}/power-curve.csv`, {
        id: String(ids.upload),
        file: "power-curve.csv",
      }),
    ).toBe(expected);
  });

  it.each<[Who, number]>([
    ["owner", 200],
    ["their coach", 200],
  ])("ride file · %s → %i", async (who, expected) => {
    expect(
      await status(who, rideApi.loader, `/api/rides/${ids.upload}/power-curve.csv`, {
        id: String(ids.upload),
        file: "power-curve.csv",
      }),
    ).toBe(expected);
  });

  it.each<[Who, number]>([
    ["owner", 200],
    ["their coach", 404],
    ["another coach", 404],
    ["another athlete", 404],
    ["admin", 404],
  ])("buyer's order page · %s → %i", async (who, expected) => {
    expect(await status(who, orderPage.loader, `/shop/orders/${ids.order}`, { orderId: String(ids.order) })).toBe(
      expected,
    );
  });
});
