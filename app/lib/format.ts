/** Formats an ISO instant as a calendar date in the viewer's zone (server and client agree when zone is given). */
export function formatDate(iso: string, timeZone = "UTC") {
  return new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", year: "numeric", timeZone }).format(
    new Date(iso),
  );
}

export function formatDateTime(iso: string, timeZone = "UTC") {
  return new Intl.DateTimeFormat("en-GB", {
    day: "numeric",
    month: "short",
    hour: "2-digit",
    minute: "2-digit",
    timeZone,
  }).format(new Date(iso));
}
