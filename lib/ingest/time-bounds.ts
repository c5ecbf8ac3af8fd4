/**
 * The one rule for which instants Lapsebank accepts as a flight's launch time, and which instants any
 * stored DateTime may hold. Every boundary (upload form, API, CLI, restore) calls these, so a row the app
 * cannot read back (PostgreSQL happily stores year 10000, which JavaScript's ISO formatting then rejects)
 * is never committed.
 */

/** Earliest plausible launch: the first instrumented balloon soundings are older, but no logger file is. */
export const EARLIEST_LAUNCH_UTC = new Date("1900-01-01T00:00:00Z");
/** How far in the future a launch time may lie (a clock a few hours fast, a launch planned for today). */
export const LAUNCH_FUTURE_ALLOWANCE_MS = 24 * 3600 * 1000;

/** Why a launch time is refused, in words for the user; null when it is acceptable. */
export function launchTimeProblem(launchAtUtc: Date, now: Date = new Date()): string | null {
  const ms = launchAtUtc.getTime();
  if (!Number.isFinite(ms)) return "Launch time is not a valid date-time";
  if (ms < EARLIEST_LAUNCH_UTC.getTime()) return `Launch time ${isoOrRaw(launchAtUtc)} is before 1900-01-01, which no logger file can be`;
  if (ms > now.getTime() + LAUNCH_FUTURE_ALLOWANCE_MS) return `Launch time ${isoOrRaw(launchAtUtc)} is more than a day in the future`;
  return null;
}

/** True when a DateTime can be stored and read back by both engines and formatted as ISO 8601 (years 0001–9999). */
export function isStorableInstant(value: Date): boolean {
  const ms = value.getTime();
  if (!Number.isFinite(ms)) return false;
  const year = value.getUTCFullYear();
  return year >= 1 && year <= 9999;
}

function isoOrRaw(value: Date): string {
  return isStorableInstant(value) ? value.toISOString() : String(value.getUTCFullYear()).concat("-…");
}
