import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { BAND_COVERAGE_REASON_WORDS, type HeightReference } from "../../lib/analysis/band-coverage.ts";
import { computeBandLapseRate } from "../../lib/analysis/layers.ts";
import type { ProfileLevel } from "../../lib/analysis/types.ts";
import type { Viewer } from "../../lib/auth/visibility.ts";
import { ClimatologyQueryError, getClimatology } from "../../lib/query/climatology-core.ts";
import { parseClimatologyQuery } from "../../lib/query/climatology-params.ts";
import { writeSyntheticArchive } from "../../seed/synthetic-archive.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

const LOCAL: Viewer = { kind: "local" };
const BIN_M = 100;

type CaseLevel = { altitudeM: number; baseM: number; topM: number; temperatureK: number };

/** Levels one per 100 m bin from fromM to toM (bin bases), centred unless `at` moves them, T falling 6.5 K/km with a wiggle. */
function bins(fromM: number, toM: number, options: { skip?: (baseM: number) => boolean; at?: (baseM: number) => number } = {}): CaseLevel[] {
  const out: CaseLevel[] = [];
  for (let baseM = fromM; baseM < toM; baseM += BIN_M) {
    if (options.skip?.(baseM)) continue;
    const altitudeM = options.at ? options.at(baseM) : baseM + BIN_M / 2;
    out.push({ altitudeM, baseM, topM: baseM + BIN_M, temperatureK: 290 - 0.0065 * altitudeM + 0.3 * Math.sin(altitudeM / 170) });
  }
  return out;
}

/** Three levels at one altitude, or one ulp apart: x values equal within rounding. */
function flatLevels(ulps: number): CaseLevel[] {
  const z = 2345.678;
  return [z, z + ulps * z * Number.EPSILON, z].map((altitudeM, i) => ({ altitudeM, baseM: 2300, topM: 2400, temperatureK: 270 - i }));
}

/** Invented cases (not real flights): ground elevation (m MSL, null = unknown) and ascent levels. */
const CASES: Array<{ name: string; groundM: number | null; levels: CaseLevel[] }> = [
  { name: "1,600 m site, full profile", groundM: 1600, levels: bins(1600, 12000) },
  { name: "95 m site, full profile", groundM: 95, levels: bins(0, 12000, { at: (b) => (b === 0 ? 97.5 : b + 50) }) },
  { name: "310 m site, four bins missing at 3.0–3.4 km", groundM: 310, levels: bins(300, 8000, { skip: (b) => b >= 3000 && b < 3400, at: (b) => (b === 300 ? 355 : b + 50) }) },
  { name: "310 m site, one bin missing at 1.0 km", groundM: 310, levels: bins(300, 8000, { skip: (b) => b === 1000, at: (b) => (b === 300 ? 355 : b + 50) }) },
  { name: "20 m site, flight ends at 1.5 km", groundM: 20, levels: bins(0, 1500) },
  { name: "1,000 m site, levels exactly one bin from each end", groundM: 1000, levels: bins(1000, 3000, { at: (b) => b + 100 }) },
  { name: "1,600 m site, first level 150 m above ground", groundM: 1600, levels: bins(1700, 12000) },
  { name: "unknown ground", groundM: null, levels: bins(0, 12000) },
  { name: "three levels at one altitude", groundM: 450, levels: flatLevels(0) },
  { name: "three levels one ulp apart", groundM: 450, levels: flatLevels(1) },
];

const QUERIES: Array<{ baseKm: number; topKm: number; reference: HeightReference }> = [
  { baseKm: 0, topKm: 2, reference: "agl" },
  { baseKm: 0, topKm: 2, reference: "msl" },
  { baseKm: 2, topKm: 5, reference: "msl" },
  { baseKm: 2, topKm: 5, reference: "agl" },
  { baseKm: 1, topKm: 6, reference: "msl" },
  { baseKm: 2.3, topKm: 2.4, reference: "msl" },
  { baseKm: 1.3, topKm: 2.4, reference: "agl" },
];

describe.each(testEngines())("band coverage: the analysis and the Climatology SQL decide alike on %s", (engine) => {
  let database: TestDatabase;
  let schoolId = "";
  const caseOfFlight = new Map<string, (typeof CASES)[number]>();

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    const archive = await writeSyntheticArchive(database, { flights: CASES.length, levelsPerFlight: 5, seed: 12 });
    schoolId = archive.schoolId;
    const summaries = await database.db.flightSummary.findMany({ orderBy: { flightId: "asc" } });
    expect(summaries).toHaveLength(CASES.length);
    for (const [i, summary] of summaries.entries()) {
      const c = CASES[i] as (typeof CASES)[number];
      caseOfFlight.set(summary.flightId, c);
      await database.db.profileLevel.deleteMany({ where: { runId: summary.runId } });
      await database.db.profileLevel.createMany({ data: c.levels.map((l) => ({ runId: summary.runId, phase: "ascent", sampleCount: 20, ...l })) });
      await database.db.flightSummary.update({ where: { id: summary.id }, data: { groundElevationM: c.groundM } });
    }
  }, 120_000);
  afterAll(async () => {
    await database?.drop();
  });

  test.each(QUERIES)("$baseKm–$topKm km $reference", async ({ baseKm, topKm, reference }) => {
    const parsed = parseClimatologyQuery({ metric: "band-lapse-rate", bandBaseKm: String(baseKm), bandTopKm: String(topKm), bandReference: reference, groupBy: "none", school: schoolId });
    if (!parsed.ok) throw new Error(parsed.message);
    const expectedValues = new Map<string, number>();
    const expectedReasons: string[] = [];
    for (const summary of await database.db.flightSummary.findMany()) {
      // The stored levels as read back, through the analysis's own band fit.
      const levels = (await database.db.profileLevel.findMany({ where: { runId: summary.runId, phase: "ascent" } })) as ProfileLevel[];
      const r = computeBandLapseRate(levels, baseKm * 1000, topKm * 1000, { reference, groundElevationM: summary.groundElevationM });
      if (r.layer) expectedValues.set(summary.flightId, r.layer.lapseRateKPerKm);
      else if (r.code !== "invalid") expectedReasons.push(BAND_COVERAGE_REASON_WORDS[r.code]);
    }
    let flights: Array<{ flightId: string; value: number }> = [];
    let reasons: string[] = [];
    try {
      const result = await getClimatology(LOCAL, parsed.query, database, { profiles: false });
      flights = result.groups.flatMap((g) => g.flights);
      reasons = result.excluded.flatMap((e) => Array.from({ length: e.count }, () => e.reason.replace(/^no coverage of [^:]+: /, "")));
      expect(result.band).toEqual({ baseM: baseKm * 1000, topM: topKm * 1000, reference, phase: "ascent" });
    } catch (error) {
      if (!(error instanceof ClimatologyQueryError)) throw error;
      reasons = [...error.message.matchAll(/(\d+) excluded: no coverage of [^:]+: ([^;)]+)/g)].flatMap((m) => Array.from({ length: Number(m[1]) }, () => m[2] as string));
    }
    const names = (ids: Iterable<string>) => [...ids].map((id) => caseOfFlight.get(id)?.name).sort();
    expect(names(flights.map((f) => f.flightId))).toEqual(names(expectedValues.keys()));
    for (const f of flights) expect(f.value).toBeCloseTo(expectedValues.get(f.flightId) ?? Number.NaN, 9);
    expect(reasons.sort()).toEqual(expectedReasons.sort());
  });

  test("the cases exercise every decision", async () => {
    const codes = new Set<string>();
    for (const q of QUERIES) {
      for (const c of CASES) {
        const levels = c.levels.map((l) => ({ ...l, phase: "ascent" as const, sampleCount: 20, temperatureSdK: null, pressureHpa: null, relativeHumidityPct: null }));
        codes.add(computeBandLapseRate(levels, q.baseKm * 1000, q.topKm * 1000, { reference: q.reference, groundElevationM: c.groundM }).code ?? "covered");
      }
    }
    expect([...codes].sort()).toEqual(["covered", "few-levels", "flat", "gap", "high-end", "low-end", "no-ground"]);
  });
});
