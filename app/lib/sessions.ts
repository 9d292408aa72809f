import { z } from "zod";
import { validateBlocks, type Block } from "~/lib/training";

export const SPORTS = ["bike", "run", "swim", "strength", "other"] as const;
export type Sport = (typeof SPORTS)[number];
export const SPORT_LABEL: Record<Sport, string> = {
  bike: "Bike",
  run: "Run",
  swim: "Swim",
  strength: "Strength",
  other: "Other",
};

const metric = z.enum(["power", "heart_rate", "pace"], { error: "Choose power, heart rate or pace." });
const pct = z.number({ error: "Enter a percentage." });
const seconds = z.number({ error: "Enter a duration like 8:00." }).int("Use whole seconds.");
const target = z.object({ metric, lowPct: pct, highPct: pct.nullish() });
const text = (max: number) => z.string().max(max, `Use at most ${max} characters.`).nullish();
const cadence = z
  .number()
  .int()
  .min(20, "Cadence must be 20–200 rpm.")
  .max(200, "Cadence must be 20–200 rpm.")
  .nullish();

/** One block as the training engine reads it; the shape used in storage, templates and exports. */
export const blockSchema = z.discriminatedUnion("kind", [
  z.object({ kind: z.enum(["warmup", "steady", "cooldown"]), durationS: seconds, target, cadence, cue: text(200) }),
  z.object({ kind: z.literal("ramp"), durationS: seconds, metric, fromPct: pct, toPct: pct, cadence, cue: text(200) }),
  z.object({
    kind: z.literal("repeats"),
    count: z.number().int("Repeat a whole number of times."),
    work: z.object({ durationS: seconds, target }),
    recovery: z.object({ durationS: seconds, target: target.nullish() }),
    cadence,
    cue: text(200),
  }),
  z.object({ kind: z.literal("open"), durationS: seconds, cue: text(200) }),
]);

export const sessionSchema = z
  .object({
    name: z
      .string({ error: "Give the session a name." })
      .trim()
      .min(1, "Give the session a name.")
      .max(120, "Use at most 120 characters."),
    sport: z.enum(SPORTS, { error: "Choose a sport." }),
    description: z.string().trim().max(2000, "Use at most 2000 characters.").default(""),
    tags: z
      .array(z.string().trim().toLowerCase().min(1).max(30, "Keep each tag under 30 characters."))
      .max(12, "Use at most 12 tags.")
      .default([])
      .transform((t) => Array.from(new Set(t))),
    testProtocol: z.string().max(32).nullish(),
    blocks: z.array(blockSchema, { error: "Add at least one block." }),
  })
  .superRefine((s, ctx) => {
    // The engine's limits (0–300 %, 1 s–12 h, 1–50 repeats) are the single source of truth.
    for (const [path, message] of Object.entries(validateBlocks(s.blocks as Block[]))) {
      ctx.addIssue({ code: "custom", message, path: path.split(".").map((p) => (/^\d+$/.test(p) ? Number(p) : p)) });
    }
  });
export type SessionInput = z.infer<typeof sessionSchema>;

/** Our own exchange format for session shelves: { format, version, sessions: [...] }. */
export const EXPORT_FORMAT = "pacewright-sessions";
export const exportSchema = z.object({
  format: z.literal(EXPORT_FORMAT, {
    error: `This is not a Pacewright session file (format must be "${EXPORT_FORMAT}").`,
  }),
  version: z.literal(1, { error: "Only version 1 session files can be imported." }),
  sessions: z.array(z.unknown()).min(1, "The file has no sessions.").max(500, "Import at most 500 sessions at a time."),
});

/** Turns zod issues into "where: what" lines a coach can act on. */
export function describeIssues(error: z.ZodError, prefix = ""): string[] {
  return error.issues.slice(0, 10).map((i) => `${prefix}${i.path.length ? i.path.join(".") + ": " : ""}${i.message}`);
}

// Words for blocks live in a module without zod, so pages that only show sessions (the board) do not load the schemas.
export { describeBlock, describeTarget } from "./session-text";

export const BLOCK_LABEL: Record<Block["kind"], string> = {
  warmup: "Warm-up",
  steady: "Steady",
  ramp: "Ramp",
  repeats: "Repeats",
  cooldown: "Cool-down",
  open: "Open",
};

export function newBlock(kind: Block["kind"], metric: "power" | "heart_rate" | "pace" = "power"): Block {
  switch (kind) {
    case "warmup":
      return { kind, durationS: 600, target: { metric, lowPct: 50, highPct: 65 } };
    case "cooldown":
      return { kind, durationS: 600, target: { metric, lowPct: 45, highPct: 55 } };
    case "steady":
      return { kind, durationS: 1200, target: { metric, lowPct: 70, highPct: 75 } };
    case "ramp":
      return { kind, durationS: 600, metric, fromPct: 60, toPct: 90 };
    case "repeats":
      return {
        kind,
        count: 4,
        work: { durationS: 480, target: { metric, lowPct: 95, highPct: 100 } },
        recovery: { durationS: 240, target: { metric, lowPct: 50 } },
      };
    case "open":
      return { kind, durationS: 300, cue: "" };
  }
}
