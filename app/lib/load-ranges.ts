/** The periods the load page offers, by the key the URL carries (`?range=3m`); 3 months when absent or unknown. */
export const LOAD_RANGES = [
  { key: "6w", label: "6 weeks", days: 42 },
  { key: "3m", label: "3 months", days: 90 },
  { key: "6m", label: "6 months", days: 182 },
  { key: "1y", label: "1 year", days: 365 },
] as const;

export type LoadRangeKey = (typeof LOAD_RANGES)[number]["key"];

export function loadRange(key: string | null) {
  return LOAD_RANGES.find((r) => r.key === key) ?? LOAD_RANGES[1];
}
