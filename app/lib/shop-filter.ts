/** The shop window's filters as the URL carries them (`?sport=bike&maxWeeks=12&maxHours=8`); anything else is ignored. */
export const SHOP_SPORTS = ["bike", "run", "swim", "multi"] as const;

export interface ShopFilter {
  sport?: (typeof SHOP_SPORTS)[number];
  maxWeeks?: number;
  maxHours?: number;
}

const whole = (v: string | null, lo: number, hi: number) => {
  const n = Number(v);
  return v && Number.isInteger(n) && n >= lo && n <= hi ? n : undefined;
};

export function shopFilter(params: URLSearchParams): ShopFilter {
  const sport = params.get("sport");
  return {
    sport: SHOP_SPORTS.find((s) => s === sport),
    maxWeeks: whole(params.get("maxWeeks"), 1, 104),
    maxHours: whole(params.get("maxHours"), 1, 40),
  };
}
