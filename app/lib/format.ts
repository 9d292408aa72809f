// Building an Intl formatter costs far more than using one (a roster or a feed formats hundreds of values): every
// formatter the app uses is made once per option set and zone, and kept.
const formats = new Map<string, Intl.DateTimeFormat | Intl.NumberFormat>();

export function dateFormat(opts: Intl.DateTimeFormatOptions, locale = "en-GB"): Intl.DateTimeFormat {
  const key = `d|${locale}|${JSON.stringify(opts)}`;
  let f = formats.get(key) as Intl.DateTimeFormat | undefined;
  if (!f) formats.set(key, (f = new Intl.DateTimeFormat(locale, opts)));
  return f;
}

export function numberFormat(opts: Intl.NumberFormatOptions, locale = "en-GB"): Intl.NumberFormat {
  const key = `n|${locale}|${JSON.stringify(opts)}`;
  let f = formats.get(key) as Intl.NumberFormat | undefined;
  if (!f) formats.set(key, (f = new Intl.NumberFormat(locale, opts)));
  return f;
}

/** Formats an ISO instant as a calendar date in the viewer's zone (server and client agree when zone is given). */
export function formatDate(iso: string, timeZone = "UTC") {
  return dateFormat({ day: "numeric", month: "short", year: "numeric", timeZone }).format(new Date(iso));
}

export function formatDateTime(iso: string, timeZone = "UTC") {
  return dateFormat({ day: "numeric", month: "short", hour: "2-digit", minute: "2-digit", timeZone }).format(
    new Date(iso),
  );
}

/** "Wednesday 2 December": today's heading in the person's own zone. */
export function formatLongDay(at: Date, timeZone: string) {
  return dateFormat({ weekday: "long", day: "numeric", month: "long", timeZone }).format(at);
}
