import { addDays, mondayOf, weekday } from "./dates";

/**
 * Week 1's Monday for a plan lined up from a start date (the next Monday on or after it) or to end in the week of
 * an event. The same rule as the server's alignStart (services/materialize.ts); a unit test keeps them equal.
 */
export function weekOneMonday(mode: "start" | "event", date: string, weeks: number): string {
  if (mode === "start") return weekday(date) === 0 ? date : addDays(mondayOf(date), 7);
  return addDays(mondayOf(date), -(weeks - 1) * 7);
}

export interface PlanSpan {
  name: string;
  from: string;
  to: string;
}

/** The dates a plan of `weeks` weeks would cover, Monday of week 1 to Sunday of the last week. */
export function spanOf(mode: "start" | "event", date: string, weeks: number) {
  const from = weekOneMonday(mode, date, weeks);
  return { from, to: addDays(from, weeks * 7 - 1) };
}

/** Plans already on the calendar whose remaining dates meet the new span (inclusive on both ends). */
export function overlapping(current: PlanSpan[], span: { from: string; to: string }) {
  return current.filter((c) => c.from <= span.to && span.from <= c.to);
}

/** The first Monday after every overlapping plan has ended: "start after it". */
export function firstMondayAfter(plans: PlanSpan[]) {
  const end = plans.reduce((m, p) => (p.to > m ? p.to : m), "0000-01-01");
  return addDays(mondayOf(end), 7);
}
