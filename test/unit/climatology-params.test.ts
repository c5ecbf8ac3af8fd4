import { describe, expect, test } from "vitest";
import {
  climatologySearchParams,
  describeMonths,
  parseClimatologyQuery,
  parseMonthSelection,
  searchRecord,
} from "../../lib/query/climatology-params";
import { Prisma } from "../../lib/db/index.ts";
import { and, list } from "../../lib/db/dialect.ts";
import { bandLapseRateFromLevels, bandLapseRateFromSums, sumsSpreadTooSmall } from "../../lib/query/climatology-core";
import { computeBandLapseRate } from "../../lib/analysis/layers";

describe("parseMonthSelection", () => {
  test.each([
    { text: "summer", expected: { kind: "season-name", name: "summer" } },
    { text: "JJA", expected: { kind: "months", months: [6, 7, 8], label: "JJA" } },
    { text: "Oct-Nov", expected: { kind: "months", months: [10, 11], label: "Oct–Nov" } },
    { text: "10-11", expected: { kind: "months", months: [10, 11], label: "Oct–Nov" } },
    { text: "Dec–Feb", expected: { kind: "months", months: [1, 2, 12], label: "Dec–Feb" } },
    { text: "4,5,9", expected: { kind: "months", months: [4, 5, 9], label: "Apr–May, Sep" } },
  ])("$text", ({ text, expected }) => {
    expect(parseMonthSelection(text)).toMatchObject(expected);
  });

  test("nonsense is refused", () => {
    expect(() => parseMonthSelection("Smarch")).toThrow(/not a month/);
  });

  test("describeMonths joins runs across the year end", () => {
    expect(describeMonths([12, 1, 2])).toBe("Dec–Feb");
    expect(describeMonths([1, 3])).toBe("Jan, Mar");
    expect(describeMonths([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12])).toBe("all months");
  });
});

describe("parseClimatologyQuery", () => {
  test("an empty URL is the default query", () => {
    const parsed = parseClimatologyQuery({});
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    expect(parsed.query).toMatchObject({ metric: "tropospheric-lapse-rate", groupBy: "season", phase: "ascent", qc: "exclude", invented: "auto", claim: "none", school: [], site: [] });
  });

  test("the invented-flights rule is auto by default, kept in the URL only when changed, and checked", () => {
    for (const invented of ["include", "exclude"] as const) {
      const parsed = parseClimatologyQuery({ invented });
      if (!parsed.ok) throw new Error("refused");
      expect(parsed.query.invented).toBe(invented);
      expect(climatologySearchParams(parsed.query).get("invented")).toBe(invented);
    }
    const auto = parseClimatologyQuery({ invented: "auto" });
    if (!auto.ok) throw new Error("refused");
    expect(climatologySearchParams(auto.query).has("invented")).toBe(false);
    const bad = parseClimatologyQuery({ invented: "maybe" });
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.fieldErrors.invented?.join(" ")).toMatch(/invented must be one of: auto, include, exclude/);
  });

  test.each([
    { record: { metric: "band-lapse-rate", bandBaseKm: "6", bandTopKm: "1" }, field: "bandTopKm", message: /must lie below its top/ },
    { record: { metric: "band-lapse-rate" }, field: "bandBaseKm", message: /needs a band base/ },
    { record: { from: "2024-05-01", to: "2024-01-01" }, field: "to", message: /ends .* before it starts/ },
    { record: { from: "2024-02-30" }, field: "from", message: /not a calendar date/ },
    { record: { years: "2020", from: "2023-01-01" }, field: "years", message: /contradict/ },
    { record: { season: "JJA", months: "Dec-Feb" }, field: "months", message: /no month in common/ },
    { record: { hourFrom: "14", hourTo: "8" }, field: "hourTo", message: /nothing can match/ },
    { record: { hourFrom: "25" }, field: "hourFrom", message: /between 0 and 24/ },
    { record: { metric: "altitude" }, field: "metric", message: /must be one of/ },
    { record: { phase: "descent" }, field: "phase", message: /only the band lapse rate/ },
    { record: { claim: "one-sample" }, field: "claimValue", message: /needs the stated value/ },
    { record: { claim: "two-group", groupA: "summer" }, field: "groupB", message: /needs group B/ },
    { record: { claim: "two-group", groupA: "JJA", groupB: "Aug-Sep" }, field: "groupB", message: /share Aug/ },
    // summer is DJF in the south, so it overlaps Dec-Feb there
    { record: { claim: "two-group", groupA: "summer", groupB: "Dec-Feb" }, field: "groupB", message: /southern sites/ },
    { record: { site: "a;drop" }, field: "site", message: /letters, digits/ },
    { record: { months: "Smarch" }, field: "months", message: /months: / },
  ] as Array<{ record: Record<string, string>; field: string; message: RegExp }>)("refuses $record", ({ record, field, message }) => {
    const parsed = parseClimatologyQuery(record);
    expect(parsed.ok).toBe(false);
    if (parsed.ok) return;
    expect(Object.keys(parsed.fieldErrors)).toContain(field);
    expect(parsed.fieldErrors[field]?.join(" ")).toMatch(message);
    expect(parsed.message).toContain(field);
  });

  test("a summer vs Oct–Nov claim survives the URL round trip, keeping what the person typed", () => {
    const record = { school: "s1,s2", metric: "band-lapse-rate", bandBaseKm: "1", bandTopKm: "6", claim: "two-group", groupA: "summer", groupB: "Oct-Nov", claimSide: "greater" };
    const first = parseClimatologyQuery(record);
    expect(first.ok).toBe(true);
    if (!first.ok) return;
    const params = climatologySearchParams(first.query, record);
    expect(params.get("groupB")).toBe("Oct-Nov");
    const second = parseClimatologyQuery(searchRecord(params));
    expect(second.ok && second.query).toEqual(first.query);
  });

  test("repeated keys from a multiple select are joined", () => {
    expect(searchRecord(new URLSearchParams("site=a&site=b&metric=max-altitude"))).toEqual({ site: "a,b", metric: "max-altitude" });
    expect(searchRecord({ site: ["a", "b"], groupBy: "month" })).toEqual({ site: "a,b", groupBy: "month" });
  });
});

describe("SQL fragments", () => {
  test("values are bound, never inlined, and renumbered for PostgreSQL", () => {
    const f = and([Prisma.sql`s."siteId" IN ${list(["a", "b"])}`, Prisma.sql`s."localHour" >= ${6}`]);
    expect({ text: f.sql, values: f.values }).toEqual({ text: `(s."siteId" IN (?, ?)) AND (s."localHour" >= ?)`, values: ["a", "b", 6] });
    expect(f.text).toBe(`(s."siteId" IN ($1, $2)) AND (s."localHour" >= $3)`);
  });
});

describe("bandLapseRateFromSums", () => {
  // [D] levels at 1.05, 1.15, …, 1.95 km with T = 280 − 6.5·z(km): sums written out here
  const zs = Array.from({ length: 10 }, (_, i) => 1050 + 100 * i);
  const mid = 1500;
  const x = zs.map((z) => (z - mid) / 1000);
  const y = zs.map((z) => 280 - 6.5 * (z / 1000));
  const sums = {
    n: 10, sx: x.reduce((s, v) => s + v, 0), sy: y.reduce((s, v) => s + v, 0),
    sxx: x.reduce((s, v) => s + v * v, 0), sxy: x.reduce((s, v, i) => s + v * (y[i] as number), 0),
    lowM: 1050, highM: 1950, binM: 100, maxGapM: 100,
  };

  test("recovers the lapse rate of a straight profile", () => {
    const r = bandLapseRateFromSums(sums, { baseM: 1000, topM: 2000 });
    expect(r.lapseRateKPerKm).toBeCloseTo(6.5, 10);
    expect(sumsSpreadTooSmall(sums)).toBe(false);
  });

  test("an AGL band without a ground is not covered", () => {
    expect(bandLapseRateFromSums(sums, null)).toEqual({ lapseRateKPerKm: null, reason: "no-ground" });
  });

  test.each([
    { change: { n: 2 }, reason: "few-levels" },
    { change: { lowM: 1150 }, reason: "low-end" },
    { change: { highM: 1850 }, reason: "high-end" },
    { change: { maxGapM: 301 }, reason: "gap" },
  ])("coverage rule: $reason", ({ change, reason }) => {
    expect(bandLapseRateFromSums({ ...sums, ...change }, { baseM: 1000, topM: 2000 })).toEqual({ lapseRateKPerKm: null, reason });
  });

  test("altitudes equal within rounding are no fit, from the sums' point of view and from the levels, as in regression.ts", () => {
    // [D] three levels 1 ulp apart at 2345.678 m: Sxx from the sums is round-off, not spread
    const z = 2345.678;
    const zs = [z, z + z * Number.EPSILON, z];
    const levels = zs.map((altitudeM, i) => ({ phase: "ascent" as const, altitudeM, baseM: 2300, topM: 2400, sampleCount: 20, temperatureK: 270 - i, temperatureSdK: null, pressureHpa: null, relativeHumidityPct: null }));
    const mid = 2350;
    const x = zs.map((v) => (v - mid) / 1000);
    const y = levels.map((l) => l.temperatureK);
    const flat = {
      n: 3, sx: x.reduce((a, v) => a + v, 0), sy: y.reduce((a, v) => a + v, 0), sxx: x.reduce((a, v) => a + v * v, 0),
      sxy: x.reduce((a, v, i) => a + v * (y[i] as number), 0), lowM: z, highM: zs[1] as number, binM: 100, maxGapM: null,
    };
    expect(sumsSpreadTooSmall(flat)).toBe(true);
    const range = { baseM: 2300, topM: 2400 };
    expect(bandLapseRateFromLevels(levels, range)).toEqual({ lapseRateKPerKm: null, reason: "flat" });
    expect(computeBandLapseRate(levels, 2300, 2400).layer).toBeNull();
  });
});

describe("bandReference", () => {
  test("defaults to msl, accepts agl, refuses anything else, and every band link names it", () => {
    const msl = parseClimatologyQuery({ metric: "band-lapse-rate", bandBaseKm: "0", bandTopKm: "2" });
    const agl = parseClimatologyQuery({ metric: "band-lapse-rate", bandBaseKm: "0", bandTopKm: "2", bandReference: "agl" });
    if (!msl.ok || !agl.ok) throw new Error("should parse");
    expect(msl.query.bandReference).toBe("msl");
    expect(agl.query.bandReference).toBe("agl");
    expect(climatologySearchParams(msl.query).get("bandReference")).toBe("msl");
    expect(climatologySearchParams(agl.query).get("bandReference")).toBe("agl");
    const bad = parseClimatologyQuery({ metric: "band-lapse-rate", bandBaseKm: "0", bandTopKm: "2", bandReference: "ground" });
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.fieldErrors.bandReference?.[0]).toMatch(/agl, msl/);
  });
});
