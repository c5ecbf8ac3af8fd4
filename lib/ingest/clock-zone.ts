/**
 * Reading a logger's wall-clock readings (HH:MM:SS, or date-times without an offset) as instants in a
 * named time zone. Pure: the tz database comes from the runtime's Intl through luxon; no clock, no env.
 *
 * Rules (stated here once; README's layout section repeats them):
 * - The first reading of a clock-time file is the instant with that reading nearest to the anchor (the
 *   launch time typed with the upload), so the launch lands on the typed date even when the logger was
 *   switched on before midnight (UTC or local) and launched after it.
 * - Every later reading is the earliest instant with that reading that is no more than 12 hours before the
 *   previous row: clocks run forward, so a reading that goes back more than 12 hours has passed midnight.
 * - A reading that occurs twice (the hour repeated when the clocks go back) is the first pass through that
 *   hour unless that would put it more than 10 minutes before the previous row; then it is the second pass.
 *   So a clock that steps back an hour at the change reads as continuing, while a clock that jitters back a
 *   few seconds still reads as going back (and strict mode says so).
 * - A reading that never occurs (the hour skipped when the clocks go forward) is read with the offset in
 *   force before the change, as a clock that has not been put forward yet would mean it; such readings
 *   are counted so the upload can say so.
 */
import { IANAZone } from "luxon";
import { isValidTimeZone } from "../analysis/launch-time.ts";

/** The layout's setting: "utc" (default), "site" (the flight's site's zone) or an IANA zone name. */
export type ClockZoneSetting = string;

export const DEFAULT_CLOCK_ZONE = "utc";

const MS_PER_MINUTE = 60_000;
const MS_PER_HOUR = 3_600_000;
const MS_PER_DAY = 86_400_000;
/** How far back a clock may step before its reading is taken to be on the next day. */
const ROLLOVER_MS = 12 * MS_PER_HOUR;
/** How far before the previous row a reading in the repeated hour may fall and still be the first pass. */
const REPEATED_HOUR_TOLERANCE_MS = 10 * MS_PER_MINUTE;

/** True for a layout clockZone value the schema accepts: "utc", "site" or a zone the runtime knows. */
export function isClockZoneSetting(value: string): boolean {
  return value === "utc" || value === "site" || isValidTimeZone(value);
}

/**
 * The IANA zone a layout's clock is read in, or why it cannot be: "site" needs a site whose time zone the
 * runtime knows.
 */
export function resolveClockZone(setting: ClockZoneSetting | undefined, siteTimeZone: string | null | undefined): { zone: string } | { problem: string } {
  const value = setting ?? DEFAULT_CLOCK_ZONE;
  if (value === "utc") return { zone: "UTC" };
  if (value === "site") {
    if (!siteTimeZone || !isValidTimeZone(siteTimeZone)) {
      return {
        problem: `The layout reads the clock in the site's time zone, but the site's time zone ${siteTimeZone ? `"${siteTimeZone}" is not a known IANA zone` : "is not set"}; set it on the site (e.g. Europe/Berlin) or name the clock's zone in the layout`,
      };
    }
    return { zone: siteTimeZone };
  }
  if (!isValidTimeZone(value)) return { problem: `The layout's clock zone "${value}" is not a known IANA time zone (e.g. Europe/Berlin, America/Chicago)` };
  return { zone: value };
}

/** UTC offsets of one zone, in ms, memoised per whole UTC minute (offsets are looked up for every row). */
class ZoneOffsets {
  private readonly zone: IANAZone | null;
  private readonly byMinute = new Map<number, number | null>();

  constructor(zoneName: string) {
    this.zone = zoneName === "UTC" || zoneName === "Etc/UTC" ? null : IANAZone.create(zoneName);
  }

  private exact(utcMs: number): number {
    return this.zone === null ? 0 : this.zone.offset(utcMs) * MS_PER_MINUTE;
  }

  /** Offset (local minus UTC) in force at an instant, ms. */
  at(utcMs: number): number {
    if (this.zone === null) return 0;
    const minute = Math.floor(utcMs / MS_PER_MINUTE);
    let cached = this.byMinute.get(minute);
    if (cached === undefined) {
      // A minute whose two ends agree has one offset throughout; one with a change inside is looked up exactly.
      const start = this.exact(minute * MS_PER_MINUTE);
      cached = start === this.exact(minute * MS_PER_MINUTE + MS_PER_MINUTE - 1) ? start : null;
      this.byMinute.set(minute, cached);
    }
    return cached ?? this.exact(utcMs);
  }
}

interface Candidate {
  utcMs: number;
  /** The same reading with the zone's other offset (the repeated hour), when there is one. */
  twinUtcMs: number | null;
  inGap: boolean;
}

/**
 * Turns a file's wall-clock readings into UTC instants, row by row, by the rules in this module's header.
 * One reader per file: it remembers the previous row.
 */
export class WallClockReader {
  private readonly offsets: ZoneOffsets;
  private previousUtcMs: number | null = null;
  /** Readings that fell in the hour skipped when the clocks went forward. */
  gapReadingCount = 0;
  /** Readings taken as the second pass through the hour repeated when the clocks went back. */
  repeatedHourReadingCount = 0;

  /**
   * @param zone IANA zone name the clock keeps ("UTC" for a UTC clock).
   * @param anchorUtcMs the instant the first clock-time reading is placed nearest to (the typed launch time);
   *   null when the readings carry their own date.
   */
  constructor(
    readonly zone: string,
    private readonly anchorUtcMs: number | null,
  ) {
    this.offsets = new ZoneOffsets(zone);
  }

  get hasAnchor(): boolean {
    return this.anchorUtcMs !== null;
  }

  /** A time of day with no date (seconds since local midnight, 0 ≤ s < 86,401), as a UTC instant in ms. */
  readTimeOfDay(secondsOfDay: number): number {
    const reference = this.previousUtcMs ?? this.anchorUtcMs;
    if (reference === null) throw new Error("A time of day needs an anchor instant to be dated");
    const localMidnight = Math.floor((reference + this.offsets.at(reference)) / MS_PER_DAY) * MS_PER_DAY;
    const candidates: Candidate[] = [];
    for (const day of [-1, 0, 1, 2]) candidates.push(this.instantsOf(localMidnight + day * MS_PER_DAY + secondsOfDay * 1000));
    return this.choose(candidates);
  }

  /** A local date and time written without an offset, given as "wall" ms (the reading's fields as if UTC). */
  readLocalDateTime(wallMs: number): number {
    return this.choose([this.instantsOf(wallMs)]);
  }

  private choose(candidates: Candidate[]): number {
    const previous = this.previousUtcMs;
    let chosen: Candidate;
    let utcMs: number;
    if (previous === null && this.anchorUtcMs !== null && candidates.length > 1) {
      // First row of a clock-time file: nearest to the anchor.
      chosen = nearest(candidates, this.anchorUtcMs);
      utcMs = chosen.twinUtcMs !== null && Math.abs(chosen.twinUtcMs - this.anchorUtcMs) < Math.abs(chosen.utcMs - this.anchorUtcMs) ? chosen.twinUtcMs : chosen.utcMs;
    } else {
      const floor = previous === null ? Number.NEGATIVE_INFINITY : previous - ROLLOVER_MS;
      chosen = candidates.find((c) => c.utcMs >= floor) ?? (candidates[candidates.length - 1] as Candidate);
      utcMs = chosen.utcMs;
      if (previous !== null && chosen.twinUtcMs !== null && chosen.utcMs < previous - REPEATED_HOUR_TOLERANCE_MS) {
        utcMs = chosen.twinUtcMs;
        this.repeatedHourReadingCount++;
      }
    }
    if (chosen.inGap) this.gapReadingCount++;
    this.previousUtcMs = utcMs;
    return utcMs;
  }

  /** The instant(s) at which the zone's clocks show `wallMs`: one, two (repeated hour) or none (skipped hour). */
  private instantsOf(wallMs: number): Candidate {
    // At most one change within a day either side: the offsets before and after it are the only ones.
    const before = this.offsets.at(wallMs - MS_PER_DAY);
    const after = this.offsets.at(wallMs + MS_PER_DAY);
    const valid: number[] = [];
    for (const offset of before === after ? [before] : [before, after]) {
      const utcMs = wallMs - offset;
      if (this.offsets.at(utcMs) === offset) valid.push(utcMs);
    }
    valid.sort((a, b) => a - b);
    if (valid.length === 0) return { utcMs: wallMs - before, twinUtcMs: null, inGap: true };
    return { utcMs: valid[0] as number, twinUtcMs: valid[1] ?? null, inGap: false };
  }
}

function nearest(candidates: Candidate[], targetMs: number): Candidate {
  let best = candidates[0] as Candidate;
  const distance = (c: Candidate) => Math.min(Math.abs(c.utcMs - targetMs), c.twinUtcMs === null ? Infinity : Math.abs(c.twinUtcMs - targetMs));
  for (const c of candidates) if (distance(c) < distance(best)) best = c;
  return best;
}

/**
 * The zone a preview (layout editor, upload preview) reads a clock in: the layout's zone, with "site" read as
 * the given site zone or UTC when no site is chosen yet. Previews show elapsed seconds, which only a
 * daylight-saving change inside the file would alter.
 */
export function previewClockZone(setting: ClockZoneSetting | undefined, siteTimeZone?: string | null): string {
  const resolved = resolveClockZone(setting, siteTimeZone ?? "UTC");
  return "zone" in resolved ? resolved.zone : "UTC";
}
