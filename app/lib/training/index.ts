/**
 * Pacewright's training-science engine: pure functions, no I/O, no framework imports, usable on the server and in
 * the browser. Each function documents its source; tests/unit checks each against it.
 */
export { TrainingInputError, type TrainingErrorCode } from "./errors";
export {
  thresholdFromTwentyMinute,
  thresholdFromEightMinute,
  thresholdFromRamp,
  criticalPower,
  timeToExhaustion,
  thresholdHeartRate,
  criticalSwimSpeed,
  checkRampRate,
  USUAL_RAMP_RATE_W_PER_MIN,
  CP_MIN_R2,
  CP_DURATION_RANGE_S,
  type RampRateCheck,
  type MaximalEffort,
  type CriticalPowerResult,
  type SwimThreshold,
} from "./thresholds";
export { runningIndex, raceTimeForIndex, thresholdPaceForIndex } from "./running";
export { powerLevels, heartRateZones, paceZones, zoneOf, zoneOfPct, intensityPct, type Metric, type Zone, type ZoneSet } from "./zones";
export {
  resolveTarget,
  percentOfThreshold,
  formatTarget,
  formatDuration,
  MAX_TARGET_PCT,
  type PercentTarget,
  type AbsoluteTarget,
  type TargetUnit,
} from "./targets";
export { parseActivity, CSV_HEADERS, SHORT_GAP_S, type Activity, type Sample, type Channel } from "./activity";
export {
  meanMaximal,
  powerCurve,
  bestEffort,
  detectRampTest,
  pacingSplits,
  pacingAdvice,
  heartRateDrift,
  workKj,
  minutesInZones,
  timeInTarget,
  powerOf,
  STANDARD_WINDOWS_S,
  EVEN_PACING_PCT,
  type RampDetection,
  type PacingVerdict,
} from "./analysis";
export {
  effortLoad,
  trimpBanister,
  trimpEdwards,
  edwardsZoneTops,
  edwardsZoneMinutes,
  trimpEdwardsFromHeartRate,
  EDWARDS_ZONE_FLOORS_PCT,
  monotonyStrain,
  fitnessFatigue,
  acuteChronicRatio,
  ratioBand,
  type RatioBand,
} from "./load";
export {
  estimateSession,
  expandBlocks,
  validateBlocks,
  blockDuration,
  levelOfPct,
  BLOCK_KINDS,
  LEVEL_TOPS_PCT,
  LEVEL_EFFORT,
  LIMITS,
  type Block,
  type BlockKind,
  type TargetSpec,
  type Step,
  type SessionEstimate,
} from "./session";
export { seasonSkeleton, PHASES, type Phase, type SkeletonWeek, type SkeletonInput } from "./season";
export {
  plausibilityGuard,
  requirePlausibleThreshold,
  THRESHOLD_BOUNDS,
  PLAUSIBLE_CHANGE_PCT,
  FIRST_TEST_EXPECTATION,
  type GuardInput,
  type GuardResult,
} from "./plausibility";
