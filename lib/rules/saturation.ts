// Saturation temperatures of a refrigerant from pressure readings, remembered per reading.

import { saturationTempC, type Refrigerant } from "@/lib/refrigerant";

const SATURATION_CACHE_SIZE = 20_000;
const saturationCaches = new Map<string, Map<number, number>>();

/**
 * `saturationTempC` for one refrigerant, remembered per pressure reading: the margin series
 * revisits every sample of the last hour at each evaluation, and each inversion is a Newton
 * solve (a 24 h replay spent most of its 1–3 minutes here). Cleared when full, so it stays small.
 */
export function cachedSaturationTempC(refrigerant: Refrigerant): (kPa: number) => number {
  let cache = saturationCaches.get(refrigerant);
  if (!cache) saturationCaches.set(refrigerant, (cache = new Map()));
  const memo = cache;
  return (kPa) => {
    let t = memo.get(kPa);
    if (t === undefined) {
      if (memo.size >= SATURATION_CACHE_SIZE) memo.clear();
      t = saturationTempC(refrigerant, kPa);
      memo.set(kPa, t);
    }
    return t;
  };
}
