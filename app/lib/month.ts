import { addDays, isIsoDate, mondayOf } from "~/lib/dates";

/** The month a "YYYY-MM" parameter names, or the month of `today` when it is missing or malformed. */
export function monthOf(param: string | null, today: string): string {
  return param && /^\d{4}-(0[1-9]|1[0-2])$/.test(param) ? param : today.slice(0, 7);
}

/** The weeks (Monday to Sunday) that show a month whole: from the Monday on or before the 1st to the Sunday on or after the last day. */
export function monthGrid(month: string): { from: string; to: string; first: string; last: string } {
  const first = `${month}-01`;
  const [y, m] = month.split("-").map(Number);
  const next = m === 12 ? `${y + 1}-01-01` : `${y}-${String(m + 1).padStart(2, "0")}-01`;
  const last = addDays(next, -1);
  if (!isIsoDate(first) || !isIsoDate(last)) throw new Error(`not a month: ${month}`);
  return { from: mondayOf(first), to: addDays(mondayOf(last), 6), first, last };
}

export function shiftMonth(month: string, by: number): string {
  const [y, m] = month.split("-").map(Number);
  const i = y * 12 + (m - 1) + by;
  return `${Math.floor(i / 12)}-${String((i % 12) + 1).padStart(2, "0")}`;
}
