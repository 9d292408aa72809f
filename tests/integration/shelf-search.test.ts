import { describe, expect, it } from "vitest";
import { createShelfSession, listShelfSessions } from "~/.server/services/shelf";
import { sessionSchema } from "~/lib/sessions";
import { makeUser } from "./helpers";

const blocks = [{ kind: "steady", durationS: 1200, target: { metric: "power", lowPct: 88, highPct: 94 } }];

describe("shelf search", () => {
  it("matches %, _ and \\ literally", async () => {
    const coach = await makeUser({ role: "coach" });
    for (const name of [
      "Over-unders at 105% and 95%",
      "Over-unders at 105 and 95",
      "tempo_long",
      "tempoXlong",
      "Hills \\ flats",
    ]) {
      await createShelfSession(coach.id, sessionSchema.parse({ name, sport: "bike", blocks }));
    }
    const names = async (q: string) => (await listShelfSessions(coach.id, { q })).map((s) => s.name);
    expect(await names("%")).toEqual(["Over-unders at 105% and 95%"]);
    expect(await names("5% and")).toEqual(["Over-unders at 105% and 95%"]);
    expect(await names("_")).toEqual(["tempo_long"]);
    expect(await names("tempo_l")).toEqual(["tempo_long"]);
    expect(await names("\\")).toEqual(["Hills \\ flats"]);
    expect(await names("over-UNDERS")).toHaveLength(2); // still case-insensitive, as before
  });
});
