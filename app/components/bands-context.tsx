import { createContext, useContext } from "react";
import { defaultBandSets, type BandSet, type BandSetKey } from "~/lib/training";

/** The band sets the signed-in viewer sees (their own as coach, their coach's as athlete), for shading anywhere. */
const BandsContext = createContext<Record<BandSetKey, BandSet>>(defaultBandSets());

export const BandsProvider = BandsContext.Provider;

export function useBandSets() {
  return useContext(BandsContext);
}

export function useBandSet(key: BandSetKey) {
  return useContext(BandsContext)[key];
}
