/** Reads "45", "8:00", "1:02:30" (s, m:ss, h:mm:ss) into seconds; null when it cannot. */
export function parseDuration(input: string): number | null {
  const s = input.trim();
  if (!/^\d{1,5}(:\d{1,2}){0,2}$/.test(s)) return null;
  const parts = s.split(":").map(Number);
  if (parts.slice(1).some((p) => p >= 60)) return null;
  return parts.reduce((total, p) => total * 60 + p, 0);
}

/** 480 → "8:00", 3750 → "1:02:30". */
export function formatClock(totalS: number): string {
  const s = Math.max(0, Math.round(totalS));
  const h = Math.floor(s / 3600);
  const m = Math.floor((s % 3600) / 60);
  const sec = s % 60;
  return h > 0
    ? `${h}:${String(m).padStart(2, "0")}:${String(sec).padStart(2, "0")}`
    : `${m}:${String(sec).padStart(2, "0")}`;
}

/** 480 → "8 min", 5400 → "1 h 30 min", 45 → "45 s". */
export function formatMinutes(totalS: number): string {
  const s = Math.round(totalS);
  if (s < 60) return `${s} s`;
  if (s % 60 !== 0 && s < 600) return `${formatClock(s)} min`;
  const m = Math.round(s / 60);
  const h = Math.floor(m / 60);
  return h > 0 ? `${h} h${m % 60 ? ` ${m % 60} min` : ""}` : `${m} min`;
}
