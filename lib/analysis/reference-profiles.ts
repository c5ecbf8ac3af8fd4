/**
 * ITU-R P.835 mid-latitude reference temperature profiles (Recommendation ITU-R P.835,
 * "Reference standard atmospheres"), h in km, T in K, used as climatology anchors.
 */

/** Mid-latitude summer: 294.9838 − 5.2159h − 0.07109h² (0–13 km), 215.15 K (13–17 km); null outside. */
export function ituMidLatitudeSummerTemperatureK(altitudeM: number): number | null {
  if (!Number.isFinite(altitudeM)) return null;
  const h = altitudeM / 1000;
  if (h < 0 || h > 17) return null;
  if (h <= 13) return 294.9838 - 5.2159 * h - 0.07109 * h * h;
  return 215.15;
}

/** Mid-latitude winter: 272.7241 − 3.6217h − 0.1759h² (0–10 km), 218 K (10–33 km); null outside. */
export function ituMidLatitudeWinterTemperatureK(altitudeM: number): number | null {
  if (!Number.isFinite(altitudeM)) return null;
  const h = altitudeM / 1000;
  if (h < 0 || h > 33) return null;
  if (h <= 10) return 272.7241 - 3.6217 * h - 0.1759 * h * h;
  return 218;
}
