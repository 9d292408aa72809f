import { describe, expect, it } from "vitest";
import { Listing } from "~/.server/models";
import { createPlan } from "~/.server/services/plans";
import * as shopApi from "~/routes/api/shop";
import * as shopPage from "~/routes/shop/index";
import { getRequest, makeUser, payloadOf, run } from "./helpers";

async function window() {
  const coach = await makeUser({ role: "coach" });
  const plan = await createPlan(coach.id, {
    name: "Window",
    sport: "bike",
    description: "",
    alignment: "start",
    date: "2027-01-04",
    weeks: 4,
    weeklyHours: 8,
    pattern: "3:1",
    testEveryWeeks: 6,
  });
  const base = {
    planId: plan.id,
    coachId: coach.id,
    description: "A plan.",
    level: "intermediate",
    priceCents: 4900,
    currency: "EUR",
  };
  const tag = Math.random().toString(36).slice(2, 8);
  await Listing.create({
    ...base,
    slug: `bike-short-${tag}`,
    title: `Bike short ${tag}`,
    sport: "bike",
    weeks: 8,
    weeklyHours: 6,
    published: true,
  });
  await Listing.create({
    ...base,
    slug: `bike-long-${tag}`,
    title: `Bike long ${tag}`,
    sport: "bike",
    weeks: 20,
    weeklyHours: 10,
    published: true,
  });
  await Listing.create({
    ...base,
    slug: `run-${tag}`,
    title: `Run ${tag}`,
    sport: "run",
    weeks: 12,
    weeklyHours: 5,
    published: true,
  });
  await Listing.create({
    ...base,
    slug: `hidden-${tag}`,
    title: `Hidden ${tag}`,
    sport: "bike",
    weeks: 8,
    weeklyHours: 6,
    published: false,
  });
  return tag;
}

const titles = (r: { listings: { title: string }[] }, tag: string) =>
  r.listings
    .map((l) => l.title)
    .filter((t) => t.endsWith(tag))
    .sort();

describe("the shop window's filters live in the URL", () => {
  it("the page loader filters by sport, weeks and hours from search params, and never shows unpublished plans", async () => {
    const tag = await window();
    expect(titles(payloadOf(await run(shopPage.loader, getRequest("/shop"))), tag)).toEqual([
      `Bike long ${tag}`,
      `Bike short ${tag}`,
      `Run ${tag}`,
    ]);
    const bikeShort = payloadOf(await run(shopPage.loader, getRequest("/shop?sport=bike&maxWeeks=12")));
    expect(bikeShort.filter).toEqual({ sport: "bike", maxWeeks: 12, maxHours: undefined });
    expect(titles(bikeShort, tag)).toEqual([`Bike short ${tag}`]);
    expect(titles(payloadOf(await run(shopPage.loader, getRequest("/shop?maxHours=5"))), tag)).toEqual([`Run ${tag}`]);
  });

  it("nonsense in the URL is ignored rather than failing, the same in the page and the JSON route", async () => {
    const tag = await window();
    const odd = payloadOf(await run(shopPage.loader, getRequest("/shop?sport=chess&maxWeeks=-3&maxHours=lots")));
    expect(odd.filter).toEqual({ sport: undefined, maxWeeks: undefined, maxHours: undefined });
    expect(titles(odd, tag)).toHaveLength(3);
    const json = ((await await run(shopApi.loader, getRequest("/api/shop?sport=run"))) as Response).json();
    expect(titles(await json, tag)).toEqual([`Run ${tag}`]);
  });
});
