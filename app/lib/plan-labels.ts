import type { PHASES } from "~/lib/training";

export const PLAN_SPORTS = ["bike", "run", "swim", "multi"] as const;
export const PHASE_LABEL: Record<(typeof PHASES)[number], string> = {
  base: "Base",
  build: "Build",
  peak: "Peak",
  taper: "Taper",
  race: "Race",
  recovery: "Recovery",
};
export const DAY_NAMES = ["Mon", "Tue", "Wed", "Thu", "Fri", "Sat", "Sun"] as const;
export const DAY_LONG = ["Monday", "Tuesday", "Wednesday", "Thursday", "Friday", "Saturday", "Sunday"] as const;
