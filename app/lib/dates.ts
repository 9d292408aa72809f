/** Calendar-date helpers on YYYY-MM-DD strings, computed in UTC so no daylight-saving shift can move a day. */
const DAY = 86_400_000;

export const toMs = (iso: string) => Date.parse(`${iso}T00:00:00Z`);
export const fromMs = (ms: number) => new Date(ms).toISOString().slice(0, 10);
export const addDays = (iso: string, n: number) => fromMs(toMs(iso) + n * DAY);
export const daysBetween = (a: string, b: string) => Math.round((toMs(b) - toMs(a)) / DAY);
/** 0 = Monday … 6 = Sunday. */
export const weekday = (iso: string) => (new Date(toMs(iso)).getUTCDay() + 6) % 7;
export const mondayOf = (iso: string) => addDays(iso, -weekday(iso));
export const isIsoDate = (s: unknown): s is string => typeof s === "string" && /^\d{4}-\d{2}-\d{2}$/.test(s) && Number.isFinite(toMs(s)) && fromMs(toMs(s)) === s;

/** Today's date where the athlete lives. */
// Building an Intl formatter costs far more than using one: one per time zone (or option set), kept.
const dayFormats = new Map<string, Intl.DateTimeFormat>();
function cachedFormat(key: string, make: () => Intl.DateTimeFormat) {
  let f = dayFormats.get(key);
  if (!f) dayFormats.set(key, (f = make()));
  return f;
}

export function todayIn(timeZone: string, now = new Date()): string {
  const parts = cachedFormat(`today:${timeZone}`, () => new Intl.DateTimeFormat("en-CA", { timeZone, year: "numeric", month: "2-digit", day: "2-digit" })).formatToParts(now);
  const get = (t: string) => parts.find((p) => p.type === t)!.value;
  return `${get("year")}-${get("month")}-${get("day")}`;
}

export function formatDay(iso: string, opts: Intl.DateTimeFormatOptions = { weekday: "short", day: "numeric", month: "short" }) {
  return cachedFormat(`day:${JSON.stringify(opts)}`, () => new Intl.DateTimeFormat("en-GB", { ...opts, timeZone: "UTC" })).format(new Date(toMs(iso)));
}
