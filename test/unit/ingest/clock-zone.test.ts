import { describe, expect, test } from "vitest";
import { resolveClockZone, WallClockReader } from "../../../lib/ingest/clock-zone.ts";
import { loggerLayoutSpecSchema } from "../../../lib/ingest/layout.ts";

// Offsets and change instants below: US rule since 2007 (second Sunday of March 02:00 → 03:00, first Sunday of
// November 02:00 → 01:00 local; CST = UTC−6, CDT = UTC−5) and EU rule (last Sunday of March and of October,
// 01:00 UTC; CET = UTC+1, CEST = UTC+2), as the IANA tz database records them [P]. Instants recomputed by hand [D].
const hms = (text: string): number => {
  const [h, m, s] = text.split(":").map(Number);
  return ((h ?? 0) * 60 + (m ?? 0)) * 60 + (s ?? 0);
};
const iso = (ms: number) => new Date(ms).toISOString().replace(".000", "");

function readAll(zone: string, anchor: string, readings: string[]): { instants: string[]; reader: WallClockReader } {
  const reader = new WallClockReader(zone, Date.parse(anchor));
  return { instants: readings.map((r) => iso(reader.readTimeOfDay(hms(r)))), reader };
}

describe("resolveClockZone", () => {
  test.each([
    [undefined, "Europe/Berlin", "UTC"],
    ["utc", "Europe/Berlin", "UTC"],
    ["site", "America/Chicago", "America/Chicago"],
    ["Europe/Berlin", "America/Chicago", "Europe/Berlin"],
  ])("%s with site %s reads the clock in %s", (setting, site, zone) => {
    expect(resolveClockZone(setting, site)).toEqual({ zone });
  });

  test.each([["site", "Mars/Olympus"], ["site", ""], ["Nowhere/Special", "UTC"]])("%s with site %j is refused with a reason", (setting, site) => {
    const resolved = resolveClockZone(setting, site);
    expect("problem" in resolved && resolved.problem).toMatch(/time zone|IANA/);
  });
});

describe("WallClockReader", () => {
  test("a UTC clock is read on the anchor's date", () => {
    expect(readAll("UTC", "2024-07-10T06:01:00Z", ["06:00:00", "06:00:02"]).instants).toEqual(["2024-07-10T06:00:00Z", "2024-07-10T06:00:02Z"]);
  });

  test("Chicago summer: a 06:41 local clock is 11:41 UTC (CDT, UTC−5)", () => {
    expect(readAll("America/Chicago", "2025-07-14T06:41:00-05:00", ["06:30:00", "06:41:00"]).instants).toEqual(["2025-07-14T11:30:00Z", "2025-07-14T11:41:00Z"]);
  });

  test("logger switched on before midnight UTC, launched after it: the launch keeps the typed date", () => {
    // Typed launch 2025-01-15T00:10Z; first row 23:50 is the evening before.
    expect(readAll("UTC", "2025-01-15T00:10:00Z", ["23:50:00", "23:59:59", "00:00:01", "00:10:00"]).instants).toEqual([
      "2025-01-14T23:50:00Z", "2025-01-14T23:59:59Z", "2025-01-15T00:00:01Z", "2025-01-15T00:10:00Z",
    ]);
  });

  test("a local clock crossing local midnight rolls the date forward", () => {
    // Berlin in January is CET (UTC+1): 23:59:30 local on the 14th is 22:59:30Z.
    expect(readAll("Europe/Berlin", "2025-01-15T00:05:00+01:00", ["23:59:30", "00:00:30", "00:05:00"]).instants).toEqual([
      "2025-01-14T22:59:30Z", "2025-01-14T23:00:30Z", "2025-01-14T23:05:00Z",
    ]);
  });

  test("Chicago spring forward (2025-03-09): 01:59 CST is followed by 03:00 CDT, one minute later", () => {
    const { instants, reader } = readAll("America/Chicago", "2025-03-09T01:30:00-06:00", ["01:58:00", "01:59:00", "03:00:00", "03:01:00"]);
    expect(instants).toEqual(["2025-03-09T07:58:00Z", "2025-03-09T07:59:00Z", "2025-03-09T08:00:00Z", "2025-03-09T08:01:00Z"]);
    expect(reader.gapReadingCount).toBe(0);
  });

  test("Chicago spring forward: a reading in the skipped hour is read with the offset before the change, and counted", () => {
    // 02:30 never happens in Chicago that day; a clock not yet put forward means 02:30 CST = 08:30Z.
    const { instants, reader } = readAll("America/Chicago", "2025-03-09T01:30:00-06:00", ["01:59:00", "02:30:00"]);
    expect(instants).toEqual(["2025-03-09T07:59:00Z", "2025-03-09T08:30:00Z"]);
    expect(reader.gapReadingCount).toBe(1);
  });

  test("Chicago fall back (2025-11-02): a clock stepping back from 01:59 CDT to 01:00 CST reads as continuing", () => {
    const { instants, reader } = readAll("America/Chicago", "2025-11-02T01:30:00-05:00", ["01:58:00", "01:59:00", "01:00:00", "01:01:00", "02:00:00"]);
    expect(instants).toEqual(["2025-11-02T06:58:00Z", "2025-11-02T06:59:00Z", "2025-11-02T07:00:00Z", "2025-11-02T07:01:00Z", "2025-11-02T08:00:00Z"]);
    expect(reader.repeatedHourReadingCount).toBe(2);
  });

  test("in the repeated hour a clock that jitters back a second is not moved an hour on", () => {
    const { instants } = readAll("America/Chicago", "2025-11-02T01:30:00-05:00", ["01:30:05", "01:30:04"]);
    expect(instants).toEqual(["2025-11-02T06:30:05Z", "2025-11-02T06:30:04Z"]);
  });

  test("Berlin spring forward (2025-03-30): 01:59 CET then 03:00 CEST", () => {
    expect(readAll("Europe/Berlin", "2025-03-30T02:00:00+01:00", ["01:59:00", "03:00:00"]).instants).toEqual(["2025-03-30T00:59:00Z", "2025-03-30T01:00:00Z"]);
  });

  test("Berlin fall back (2025-10-26): 02:59 CEST, then 02:00 CET, is 00:59Z then 01:00Z", () => {
    const { instants } = readAll("Europe/Berlin", "2025-10-26T02:30:00+02:00", ["02:58:00", "02:59:00", "02:00:00", "02:30:00", "03:00:00"]);
    expect(instants).toEqual(["2025-10-26T00:58:00Z", "2025-10-26T00:59:00Z", "2025-10-26T01:00:00Z", "2025-10-26T01:30:00Z", "2025-10-26T02:00:00Z"]);
  });

  test("a first reading in the repeated hour is the one nearer the anchor", () => {
    // Typed 01:20 CST (07:20Z): the first row 01:15 is the CST pass, 07:15Z.
    expect(readAll("America/Chicago", "2025-11-02T01:20:00-06:00", ["01:15:00"]).instants).toEqual(["2025-11-02T07:15:00Z"]);
  });

  test("local date-times without an offset, across the Berlin fall-back change", () => {
    const reader = new WallClockReader("Europe/Berlin", null);
    const wall = (text: string) => iso(reader.readLocalDateTime(Date.parse(`${text}Z`)));
    expect([wall("2025-10-26T02:59:00"), wall("2025-10-26T02:00:00"), wall("2025-10-26T02:01:00")]).toEqual([
      "2025-10-26T00:59:00Z", "2025-10-26T01:00:00Z", "2025-10-26T01:01:00Z",
    ]);
  });
});

describe("layout clockZone", () => {
  const layout = (time: Record<string, unknown>) => ({
    name: "t", delimiter: "comma", hasHeader: true, commentPrefix: null, decimalSeparator: ".",
    columns: { time: { column: "clock", ...time }, altitude: { column: "alt", unit: "m" }, temperature: { column: "t", unit: "degC" } },
  });

  test.each(["utc", "site", "Europe/Berlin", "Etc/GMT+6"])("accepts %s on a clock-time column", (clockZone) => {
    expect(loggerLayoutSpecSchema.safeParse(layout({ format: "clock-time", clockZone })).success).toBe(true);
  });

  test("absent means UTC, as before", () => {
    const parsed = loggerLayoutSpecSchema.parse(layout({ format: "clock-time" }));
    expect(parsed.columns.time.clockZone).toBeUndefined();
    expect(resolveClockZone(parsed.columns.time.clockZone, "America/Chicago")).toEqual({ zone: "UTC" });
  });

  test.each([
    [{ format: "clock-time", clockZone: "Mars/Olympus" }, /Clock zone must be/],
    [{ format: "clock-time", clockZone: "local" }, /Clock zone must be/],
    [{ format: "elapsed-seconds", clockZone: "site" }, /Elapsed seconds have no clock/],
  ])("refuses %j", (time, words) => {
    const parsed = loggerLayoutSpecSchema.safeParse(layout(time));
    expect(parsed.success).toBe(false);
    expect(parsed.error?.issues.map((i) => i.message).join(" ")).toMatch(words);
  });
});
