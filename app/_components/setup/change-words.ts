/** Plain words for what moved between two analysis runs ("tropopause moved by +120 m"). */
export interface ChangeLike {
  tropopauseAltitudeDeltaM: number | null;
  troposphericLapseRateDeltaKPerKm: number | null;
  surfaceTemperatureDeltaK: number | null;
  calibrationChanged: boolean;
  analysisVersionChanged: boolean | { from: string; to: string } | null;
  parametersChanged?: boolean;
  changedParameters?: string[];
  layoutChanged?: boolean;
  siteChanged?: boolean;
  tropopauseFoundChanged?: boolean;
  /** Stored snapshots that could not be read, in words. */
  unreadable?: string[];
}

const signed = (value: number, digits: number) => {
  const text = Math.abs(value).toFixed(digits);
  if (Number(text) === 0) return (0).toFixed(digits);
  return `${value > 0 ? "+" : "−"}${text}`;
};

export function describeChange(change: ChangeLike): string[] {
  const words: string[] = [];
  if (change.tropopauseAltitudeDeltaM !== null) words.push(`tropopause moved by ${signed(change.tropopauseAltitudeDeltaM, 0)} m`);
  else if (change.tropopauseFoundChanged) words.push("tropopause found in one run only");
  if (change.troposphericLapseRateDeltaKPerKm !== null) words.push(`lapse rate by ${signed(change.troposphericLapseRateDeltaKPerKm, 2)} K/km`);
  if (change.surfaceTemperatureDeltaK !== null) words.push(`surface temperature by ${signed(change.surfaceTemperatureDeltaK, 2)} K`);
  if (change.calibrationChanged) words.push("calibration changed");
  if (change.layoutChanged) words.push("logger layout changed");
  if (change.siteChanged) words.push("site corrected");
  if (change.changedParameters && change.changedParameters.length > 0) words.push(`parameters changed (${change.changedParameters.join(", ")})`);
  else if (change.parametersChanged) words.push("parameters changed");
  const version = change.analysisVersionChanged;
  if (version && typeof version === "object") words.push(`analysis version ${version.from} → ${version.to}`);
  else if (version === true) words.push("analysis version changed");
  words.push(...(change.unreadable ?? []));
  return words;
}
