import { Op, QueryTypes } from "sequelize";
import { z } from "zod";
import { db, writeTransaction } from "../db";
import { FieldTest, ScheduledSession, Upload, type User } from "../models";
import { loadActivity, type UploadSummary } from "./uploads";
import { addDays, mondayOf } from "~/lib/dates";
import {
  comparePacing,
  DEFAULT_SPLIT_PCT,
  isPacedProtocol,
  pacingPlan,
  pacingSplits,
  TrainingInputError,
  validateSplit,
  type PacingPlan,
  type PlanComparison,
} from "~/lib/training";
import { DomainError } from "../errors";

export interface PacingBasis {
  thresholdW: number;
  /** Where the threshold came from: the one the session's targets use, or a ramp ridden the same or the week before. */
  source: "threshold" | "ramp";
  rampTestedOn: string | null;
}

export interface PacingView {
  plan: PacingPlan | null;
  basis: PacingBasis | null;
  split: number[];
  customSplit: boolean;
  /** Why there is no plan (no threshold yet, bad lap input). */
  problem: string | null;
}

type TestSession = Pick<ScheduledSession, "id" | "athleteId" | "date" | "testProtocol" | "pacingSplit">;

export function splitOf(session: Pick<ScheduledSession, "pacingSplit">): { split: number[]; custom: boolean } {
  if (session.pacingSplit) {
    try {
      const parsed = JSON.parse(session.pacingSplit);
      if (Array.isArray(parsed) && validateSplit(parsed) === null) return { split: parsed, custom: true };
    } catch {
      // a damaged value falls back to the default split
    }
  }
  return { split: [...DEFAULT_SPLIT_PCT], custom: false };
}

/**
 * Pacing plans for the paced tests among `sessions` (other sessions are left out of the map). The threshold is the
 * bike power threshold the session's own targets were resolved with — the same number its warm-up shows — unless a
 * ramp test was saved in the session's week or the week before, whose result is fresher. Two queries in all, so the
 * calendar feed can call it for every test it holds.
 */
export async function pacingPlansFor(
  sessions: readonly TestSession[],
  opts: { lap?: { lengthM?: number | null; lapTimeS?: number | null } | null; systemKg?: number | null } = {},
) {
  const out = new Map<number, PacingView>();
  const tests = sessions.filter((s) => isPacedProtocol(s.testProtocol));
  if (!tests.length) return out;
  const rows = await db().query<{ sid: number; w: number | null }>(
    `SELECT scheduled_session_id AS sid, MAX(threshold_value) AS w FROM scheduled_blocks
     WHERE scheduled_session_id IN (:ids) AND metric = 'power' GROUP BY scheduled_session_id`,
    { replacements: { ids: tests.map((s) => s.id) }, type: QueryTypes.SELECT },
  );
  const fromBlocks = new Map(rows.map((r) => [Number(r.sid), r.w === null ? null : Number(r.w)]));
  const earliest = tests.reduce((m, s) => (s.date < m ? s.date : m), tests[0].date);
  const ramps = await FieldTest.findAll({
    where: {
      athleteId: [...new Set(tests.map((s) => s.athleteId))],
      protocol: "ramp",
      sport: "bike",
      status: "active",
      testedOn: { [Op.gte]: addDays(mondayOf(earliest), -7) },
    },
    order: [
      ["testedOn", "ASC"],
      ["id", "ASC"],
    ],
  });
  for (const s of tests) {
    const { split, custom } = splitOf(s);
    const from = addDays(mondayOf(s.date), -7);
    // The ramp session's own plan cannot come from the ramp it is.
    const ramp =
      s.testProtocol === "ramp"
        ? undefined
        : ramps.filter((r) => r.athleteId === s.athleteId && r.testedOn >= from && r.testedOn <= s.date).at(-1);
    const blockW = fromBlocks.get(s.id) ?? null;
    const basis: PacingBasis | null = ramp
      ? { thresholdW: ramp.value, source: "ramp", rampTestedOn: ramp.testedOn }
      : blockW
        ? { thresholdW: blockW, source: "threshold", rampTestedOn: null }
        : null;
    if (!basis) {
      out.set(s.id, {
        plan: null,
        basis: null,
        split,
        customSplit: custom,
        problem: "A pacing plan needs a power threshold: save a field test first.",
      });
      continue;
    }
    try {
      const plan = pacingPlan({
        protocol: s.testProtocol as PacingPlan["protocol"],
        thresholdW: basis.thresholdW,
        split,
        lap: opts.lap,
        systemKg: opts.systemKg,
      });
      out.set(s.id, { plan, basis, split, customSplit: custom, problem: null });
    } catch (err) {
      if (!(err instanceof TrainingInputError)) throw err;
      const plain = pacingPlan({
        protocol: s.testProtocol as PacingPlan["protocol"],
        thresholdW: basis.thresholdW,
        split,
      });
      out.set(s.id, { plan: plain, basis, split, customSplit: custom, problem: err.message });
    }
  }
  return out;
}

/** The lines of a plan for a calendar event's description (plain text). */
export function pacingText(view: PacingView | undefined): string | null {
  if (!view) return null;
  if (!view.plan) return `PACING PLAN: ${view.problem}`;
  const p = view.plan;
  const clock = (s: number) => `${Math.floor(s / 60)}:${String(s % 60).padStart(2, "0")}`;
  const head =
    p.protocol === "ramp"
      ? `PACING PLAN: expected best minute ${p.expectedW} W; steps to about ${p.ramp!.expectedLastStepW} W (${Math.round(p.ramp!.expectedDurationS / 60)} min).`
      : `PACING PLAN: expected ${p.expectedW} W for ${p.windowS / 60} minutes (from a threshold of ${Math.round(p.thresholdW)} W).`;
  const lines = p.segments.map(
    (s) =>
      `${clock(s.startS)}–${clock(s.startS + s.durationS)}: ${s.targetW} W${p.protocol === "ramp" ? "" : ` (${s.pct} %)`}, effort ${s.effortScore} — ${s.cue}`,
  );
  return [head, ...lines].join("\n");
}

const splitSchema = z.object({ split: z.array(z.coerce.number()).min(1) });

/**
 * A coach sets a test's split (or `reset` for the default). The feed sequence moves on so subscribed calendars
 * show the new targets. Only planned paced tests of this athlete; anything else is 404 or a clear 400.
 */
export async function savePacingSplit(
  athleteId: number,
  sessionId: number,
  input: { split?: unknown; reset?: boolean },
) {
  return writeTransaction(async (transaction) => {
    const session = await ScheduledSession.findOne({ where: { id: sessionId, athleteId }, transaction });
    if (!session) throw new DomainError("not_found", "No session with this id is on this calendar.");
    if (!isPacedProtocol(session.testProtocol))
      throw new DomainError("invalid", "Only 20-minute and 8-minute tests have a split to edit.");
    if (session.testProtocol === "ramp")
      throw new DomainError("invalid", "A ramp is paced by its steps; it has no split to edit.");
    let value: string | null = null;
    if (!input.reset) {
      const parsed = splitSchema.safeParse({ split: input.split });
      if (!parsed.success) throw new DomainError("invalid", "Give each segment as a number (% of expected power).");
      const problem = validateSplit(parsed.data.split);
      if (problem) throw new DomainError("invalid", problem);
      value = JSON.stringify(parsed.data.split);
    }
    await session.update({ pacingSplit: value, feedSequence: session.feedSequence + 1 }, { transaction });
    return splitOf(session);
  });
}

export interface PacingOutcome extends PlanComparison {
  effortStartS: number;
  windowS: number;
}

/**
 * After the test: the best effort of the test's length in the attached file (where the test was ridden), cut into
 * the plan's segments and laid against it. Null when there is no file, no power, or the file is too short.
 */
export async function pacingOutcome(
  athlete: User,
  session: Pick<ScheduledSession, "uploadId" | "testProtocol">,
  plan: PacingPlan | null,
): Promise<PacingOutcome | null> {
  if (!plan || plan.protocol === "ramp" || !session.uploadId) return null;
  const upload = await Upload.findOne({ where: { id: session.uploadId, athleteId: athlete.id } });
  if (!upload) return null;
  const key = plan.protocol === "twenty_minute" ? "20min" : "8min";
  const best = (upload.summary as Partial<UploadSummary> | null)?.efforts?.[key];
  if (!best) return null;
  try {
    const activity = await loadActivity(upload);
    const ridden = pacingSplits(activity.samples, best.startS, plan.windowS, plan.segments.length);
    return { ...comparePacing(plan, ridden.means), effortStartS: best.startS, windowS: plan.windowS };
  } catch {
    // A stored file that went missing or lost its power leaves the plan without a comparison, not the page broken.
    return null;
  }
}

/** The loop the athlete typed, from the page's search params: `lapKm` (km) or `lapTime` (m:ss or seconds). */
export function lapFromSearch(url: URL): { lengthM?: number | null; lapTimeS?: number | null } | null {
  const km = Number((url.searchParams.get("lapKm") ?? "").replace(",", "."));
  if (Number.isFinite(km) && km > 0) return { lengthM: Math.round(km * 1000) };
  const raw = (url.searchParams.get("lapTime") ?? "").trim();
  const m = /^(?:(\d{1,3}):)?(\d{1,4})$/.exec(raw);
  if (m) {
    const s = (m[1] ? Number(m[1]) * 60 : 0) + Number(m[2]);
    if (s > 0) return { lapTimeS: s };
  }
  return null;
}
