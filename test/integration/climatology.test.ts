import { DateTime } from "luxon";
import jStat from "jstat";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { computeBandLapseRate } from "../../lib/analysis/layers.ts";
import type { ProfileLevel } from "../../lib/analysis/types.ts";
import { flightVisibilityWhere, type Viewer } from "../../lib/auth/visibility.ts";
import { visibilitySql } from "../../lib/auth/visibility-sql.ts";
import { Prisma } from "../../lib/db/index.ts";
import { ingestFlightFile } from "../../lib/ingest/index.ts";
import { ClimatologyQueryError, getClimatology, type ClimatologyResult } from "../../lib/query/climatology.ts";
import { climatologyQuerySchema, parseClimatologyQuery } from "../../lib/query/climatology-params.ts";
import { mulberry32 } from "../../lib/stats/index.ts";
import { COMMA_COUNTS_LAYOUT, LINEAR_10BIT_CALIBRATION, renderLoggerFile } from "../../seed/demo-files.ts";
import { generateFlightProfile, type FlightProfileParams } from "../../seed/demo-profiles.ts";
import { generateDemoProgram } from "../../seed/demo-program.ts";
import { loadDemoProgram } from "../../seed/load.ts";
import { setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

const LOCAL: Viewer = { kind: "local" };

function query(record: Record<string, string>) {
  const parsed = parseClimatologyQuery(record);
  if (!parsed.ok) throw new Error(parsed.message);
  return parsed.query;
}

/** The result, or the query error it raised (any other error fails the test). */
async function attempt(promise: Promise<ClimatologyResult>): Promise<ClimatologyResult | ClimatologyQueryError> {
  try {
    return await promise;
  } catch (error) {
    if (error instanceof ClimatologyQueryError) return error;
    throw error;
  }
}

/** A slice of the invented demo program: the first flights of every site, plus every July flight at the southern site. */
function demoSubset() {
  const program = generateDemoProgram();
  const southern = program.sites.find((s) => s.latitudeDeg < 0);
  if (!southern) throw new Error("the demo program has no southern site");
  const zone = new Map(program.sites.map((s) => [s.key, s.timeZone]));
  const localMonth = (f: (typeof program.flights)[number]) => DateTime.fromISO(f.launchAtUtc, { zone: zone.get(f.siteKey) ?? "UTC" }).month;
  const chosen = new Set<string>();
  for (const site of program.sites) {
    program.flights.filter((f) => f.siteKey === site.key).slice(0, 7).forEach((f) => chosen.add(f.key));
  }
  const southernJuly = program.flights.filter((f) => f.siteKey === southern.key && localMonth(f) === 7);
  southernJuly.forEach((f) => chosen.add(f.key));
  return { program: { ...program, flights: program.flights.filter((f) => chosen.has(f.key)) }, southern, southernJuly };
}

/** Mean, sample SD and t-based 95 % CI written out here, independent of lib/stats and lib/query. */
function independentSummary(values: number[]) {
  const n = values.length;
  const mean = values.reduce((s, v) => s + v, 0) / n;
  const sd = Math.sqrt(values.reduce((s, v) => s + (v - mean) ** 2, 0) / (n - 1));
  const half = jStat.studentt.inv(0.975, n - 1) * (sd / Math.sqrt(n));
  return { n, mean, sd, low: mean - half, high: mean + half };
}

describe.each(testEngines())("climatology on %s (demo subset)", (engine) => {
  let database: TestDatabase;
  const subset = demoSubset();

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    const report = await loadDemoProgram(database.db, { program: subset.program });
    expect(report.failures).toEqual([]);
  }, 300_000);
  afterAll(async () => {
    await database?.drop();
  });

  async function summaries() {
    const rows = await database.db.flightSummary.findMany({
      where: { isCurrent: true, flight: { deletedAt: null } },
      include: { flight: { select: { title: true } } },
    });
    expect(rows.length).toBeGreaterThan(30);
    return rows;
  }

  test("grouped by season: n, mean, SD and CI equal a recomputation from the per-flight values", async () => {
    const rows = (await summaries()).filter((r) => !r.qcFlagged && r.troposphericLapseRateKPerKm !== null);
    const result = await getClimatology(LOCAL, query({ groupBy: "season" }), database);
    const bySeason = new Map<string, number[]>();
    for (const r of rows) bySeason.set(r.seasonName, [...(bySeason.get(r.seasonName) ?? []), r.troposphericLapseRateKPerKm as number]);
    expect(result.groups.map((g) => g.key).sort()).toEqual([...bySeason.keys()].sort());
    for (const group of result.groups) {
      const expected = independentSummary(bySeason.get(group.key) ?? []);
      expect(group.n).toBe(expected.n);
      expect(group.mean).toBeCloseTo(expected.mean, 10);
      expect(group.sd).toBeCloseTo(expected.sd, 10);
      expect(group.ci95Low).toBeCloseTo(expected.low, 9);
      expect(group.ci95High).toBeCloseTo(expected.high, 9);
      expect(group.flights.every((f) => f.value === rows.find((r) => r.flightId === f.flightId)?.troposphericLapseRateKPerKm)).toBe(true);
    }
    expect(result.overall.n).toBe(rows.length);
    // The summary-only form (flights=none) gives the same statistics without the flight lists.
    const lean = await getClimatology(LOCAL, query({ groupBy: "season", flights: "none", claim: "one-sample", claimValue: "6.5" }), database);
    const full = await getClimatology(LOCAL, query({ groupBy: "season", claim: "one-sample", claimValue: "6.5" }), database);
    expect(lean.groups.map((g) => g.key)).toEqual(full.groups.map((g) => g.key));
    lean.groups.forEach((g, i) => {
      const f = full.groups[i];
      expect(g.flights).toEqual([]);
      expect(g.n).toBe(f?.n);
      expect(g.median).toBe(f?.median);
      expect(g.mean).toBeCloseTo(f?.mean ?? Number.NaN, 10);
      expect(g.sd).toBeCloseTo(f?.sd ?? Number.NaN, 10);
      expect(g.ci95High).toBeCloseTo(f?.ci95High ?? Number.NaN, 10);
    });
    expect(lean.claim?.p).toBeCloseTo(full.claim?.p ?? Number.NaN, 10);
  });

  test("the 1.3.0 metrics read the stored summary values (mixed-layer height by hours after sunrise is one query)", async () => {
    const rows = (await summaries()).filter((r) => !r.qcFlagged);
    const cases = [
      { metric: "mixed-layer-height", value: (r: (typeof rows)[number]) => r.mixedLayerHeightM },
      { metric: "mixed-layer-height-gradient", value: (r: (typeof rows)[number]) => r.mixedLayerHeightGradientM },
      { metric: "freezing-level-altitude", value: (r: (typeof rows)[number]) => (r.freezingLevelAltitudeM === null ? null : r.freezingLevelAltitudeM / 1000) },
      { metric: "lcl-altitude", value: (r: (typeof rows)[number]) => (r.lclAltitudeM === null ? null : r.lclAltitudeM / 1000) },
      { metric: "precipitable-water", value: (r: (typeof rows)[number]) => r.precipitableWaterMm },
      { metric: "surface-dew-point", value: (r: (typeof rows)[number]) => r.surfaceDewPointK },
    ];
    expect(rows.filter((r) => r.mixedLayerHeightM !== null).length).toBeGreaterThan(10);
    for (const c of cases) {
      const expected = rows.filter((r) => c.value(r) !== null);
      const result = await attempt(getClimatology(LOCAL, query({ metric: c.metric, groupBy: "none" }), database));
      if (expected.length === 0) {
        expect(result instanceof ClimatologyQueryError || result.overall.n === 0).toBe(true);
        continue;
      }
      if (result instanceof ClimatologyQueryError) throw result;
      expect(result.overall.n).toBe(expected.length);
      const flights = result.groups.flatMap((g) => g.flights);
      for (const f of flights) expect(f.value).toBeCloseTo(c.value(rows.find((r) => r.flightId === f.flightId)!) as number, 9);
    }
    const bySunrise = await getClimatology(LOCAL, query({ metric: "mixed-layer-height", groupBy: "hours-after-sunrise" }), database);
    expect(bySunrise.groups.reduce((n, g) => n + g.n, 0)).toBe(rows.filter((r) => r.mixedLayerHeightM !== null && r.hoursAfterSunrise !== null).length);
  });

  test("filters (site, months, launch hour, QC) select the same flights as a filter written in the test", async () => {
    const rows = await summaries();
    const site = subset.program.sites[0];
    const siteRow = await database.db.site.findFirstOrThrow({ where: { name: site?.name } });
    const cases: Array<{ record: Record<string, string>; keep: (r: (typeof rows)[number]) => boolean }> = [
      { record: { site: siteRow.id }, keep: (r) => r.siteId === siteRow.id && !r.qcFlagged },
      { record: { months: "Dec-Feb", qc: "include" }, keep: (r) => [12, 1, 2].includes(r.month) },
      { record: { hourFrom: "6", hourTo: "12" }, keep: (r) => r.localHour >= 6 && r.localHour <= 12 && !r.qcFlagged },
      { record: { sunriseFrom: "-1", sunriseTo: "2", metric: "surface-inversion-frequency" }, keep: (r) => r.hoursAfterSunrise !== null && r.hoursAfterSunrise >= -1 && r.hoursAfterSunrise <= 2 && !r.qcFlagged },
      { record: { years: "2023", season: "JJA" }, keep: (r) => r.year === 2023 && [6, 7, 8].includes(r.month) && !r.qcFlagged },
      { record: { minCoverageKm: "20" }, keep: (r) => r.maxAltitudeM !== null && r.minAltitudeM !== null && r.maxAltitudeM - r.minAltitudeM >= 20_000 && !r.qcFlagged },
    ];
    for (const c of cases) {
      const q = query({ groupBy: "none", ...c.record });
      const expected = rows.filter(c.keep).map((r) => r.flightId).sort();
      const result = await attempt(getClimatology(LOCAL, q, database));
      if (expected.length === 0) {
        expect(result).toBeInstanceOf(ClimatologyQueryError);
        continue;
      }
      if (result instanceof ClimatologyQueryError) throw result;
      expect(result.matchedFlightCount, JSON.stringify(c.record)).toBe(expected.length);
      const got = result.groups.flatMap((g) => g.flights.map((f) => f.flightId)).sort();
      expect(got.length + result.excludedCount).toBe(expected.length);
      expect(got.every((id) => expected.includes(id))).toBe(true);
    }
  });

  test("hemisphere-aware seasons: a July flight at the southern site counts as winter", async () => {
    expect(subset.southernJuly.length).toBeGreaterThan(0);
    const siteRow = await database.db.site.findFirstOrThrow({ where: { name: subset.southern.name } });
    const titles = subset.southernJuly.map((f) => f.title);
    const winter = await getClimatology(LOCAL, query({ site: siteRow.id, season: "winter", groupBy: "none", qc: "include" }), database);
    const winterTitles = winter.groups.flatMap((g) => g.flights.map((f) => f.title));
    for (const title of titles) expect(winterTitles).toContain(title);
    const summer = await getClimatology(LOCAL, query({ site: siteRow.id, season: "summer", groupBy: "none", qc: "include" }), database).catch(() => null);
    const summerTitles = summer ? summer.groups.flatMap((g) => g.flights.map((f) => f.title)) : [];
    for (const title of titles) expect(summerTitles).not.toContain(title);
    // Grouped by season over every site, the southern July flights sit in the winter group, not in summer.
    const grouped = await getClimatology(LOCAL, query({ groupBy: "season", qc: "include" }), database);
    const winterGroup = grouped.groups.find((g) => g.key === "winter");
    for (const title of titles) expect(winterGroup?.flights.map((f) => f.title)).toContain(title);
    // JJA as a code is the same months everywhere, so the same flights are JJA too.
    const jja = await getClimatology(LOCAL, query({ site: siteRow.id, season: "JJA", groupBy: "none", qc: "include" }), database);
    expect(jja.groups.flatMap((g) => g.flights.map((f) => f.title)).sort()).toEqual([...winterTitles].sort());
  });

  test.each([
    { baseKm: 1, topKm: 6 },
    { baseKm: 0.3, topKm: 2 },
    { baseKm: 12, topKm: 24 },
    { baseKm: 2, topKm: 2.25 },
  ])("band lapse rate $baseKm–$topKm km in SQL agrees with computeBandLapseRate, exclusions counted", async ({ baseKm, topKm }) => {
    const rows = (await summaries()).filter((r) => !r.qcFlagged);
    const expected = new Map<string, number | null>();
    for (const r of rows) {
      const levels = await database.db.profileLevel.findMany({ where: { runId: r.runId, phase: "ascent" } });
      const reference = computeBandLapseRate(levels as ProfileLevel[], baseKm * 1000, topKm * 1000);
      expected.set(r.flightId, reference.layer ? reference.layer.lapseRateKPerKm : null);
    }
    const included = [...expected.values()].filter((v) => v !== null).length;
    const result = await attempt(getClimatology(LOCAL, query({ metric: "band-lapse-rate", bandBaseKm: String(baseKm), bandTopKm: String(topKm), groupBy: "none" }), database));
    if (included === 0) {
      expect(result).toBeInstanceOf(ClimatologyQueryError);
      expect((result as ClimatologyQueryError).message).toMatch(new RegExp(`${rows.length} excluded: no coverage of ${baseKm}–${topKm} km`));
      return;
    }
    if (result instanceof ClimatologyQueryError) throw result;
    const flights = result.groups.flatMap((g) => g.flights);
    expect(flights.length).toBe(included);
    expect(result.excludedCount).toBe(rows.length - included);
    if (result.excludedCount > 0) expect(result.excluded.every((e) => e.reason.startsWith(`no coverage of ${baseKm}–${topKm} km MSL (ascent)`))).toBe(true);
    for (const f of flights) {
      const reference = expected.get(f.flightId);
      expect(reference, f.title).not.toBeNull();
      expect(f.value).toBeCloseTo(reference as number, 9);
    }
  });

  test("levels missing inside the band: a gap of more than two bins excludes the flight, a one-bin gap does not", async () => {
    const rows = (await summaries()).filter((r) => !r.qcFlagged);
    const band = query({ metric: "band-lapse-rate", bandBaseKm: "1", bandTopKm: "6", groupBy: "none" });
    const before = await getClimatology(LOCAL, band, database);
    const covered = before.groups.flatMap((g) => g.flights);
    const [wide, narrow] = covered;
    if (!wide || !narrow) throw new Error("need two covered flights");
    const runOf = (flightId: string) => rows.find((r) => r.flightId === flightId)?.runId ?? "";
    // Remove four consecutive bins (3.0–3.4 km) from one flight and one bin (4.0–4.1 km) from another.
    await database.db.profileLevel.deleteMany({ where: { runId: runOf(wide.flightId), phase: "ascent", baseM: { gte: 3000, lt: 3400 } } });
    await database.db.profileLevel.deleteMany({ where: { runId: runOf(narrow.flightId), phase: "ascent", baseM: { gte: 4000, lt: 4100 } } });
    const after = await getClimatology(LOCAL, band, database);
    const afterFlights = after.groups.flatMap((g) => g.flights);
    expect(afterFlights.map((f) => f.flightId)).not.toContain(wide.flightId);
    expect(after.excluded.find((e) => e.reason.endsWith("a data gap of more than two bins inside the band"))?.count).toBe(1);
    const stillIn = afterFlights.find((f) => f.flightId === narrow.flightId);
    const levels = await database.db.profileLevel.findMany({ where: { runId: runOf(narrow.flightId), phase: "ascent" } });
    const reference = computeBandLapseRate(levels as ProfileLevel[], 1000, 6000);
    expect(stillIn?.value).toBeCloseTo(reference.layer?.lapseRateKPerKm ?? Number.NaN, 9);
    expect(computeBandLapseRate((await database.db.profileLevel.findMany({ where: { runId: runOf(wide.flightId), phase: "ascent" } })) as ProfileLevel[], 1000, 6000).layer).toBeNull();
  });

  test("the band check finds at least one flight of each kind in the 1–6 km case (the fixture exercises exclusion)", async () => {
    const result = await getClimatology(LOCAL, query({ metric: "band-lapse-rate", bandBaseKm: "1", bandTopKm: "6", groupBy: "site" }), database);
    // [D] the demo program's high-plains sites lie near 1.6 km, above a 1 km band base
    expect(result.excludedCount).toBeGreaterThan(0);
    expect(result.overall.n).toBeGreaterThan(0);
    expect(result.warnings.join(" ")).toMatch(/excluded: no coverage of 1–6 km/);
  });

  test("0–2 km above ground level counts the demo flights that reach 2 km above their ground; above sea level leaves out the high sites", async () => {
    const rows = (await summaries()).filter((r) => !r.qcFlagged);
    // [D] a flight reaching 2 km above its site's elevation covers the band from its first level up
    const reaching = rows.filter((r) => r.groundElevationM !== null && r.maxAltitudeM !== null && r.maxAltitudeM - r.groundElevationM >= 2000);
    expect(reaching.length).toBeGreaterThan(20);
    const agl = await getClimatology(LOCAL, query({ metric: "band-lapse-rate", bandBaseKm: "0", bandTopKm: "2", bandReference: "agl", groupBy: "site" }), database);
    expect(agl.band).toEqual({ baseM: 0, topM: 2000, reference: "agl", phase: "ascent" });
    expect(agl.metric.label).toBe("band lapse rate 0–2 km AGL");
    expect(agl.groups.flatMap((g) => g.flights.map((f) => f.flightId)).sort()).toEqual(reaching.map((r) => r.flightId).sort());
    expect(agl.excludedCount).toBe(rows.length - reaching.length);
    const msl = await attempt(getClimatology(LOCAL, query({ metric: "band-lapse-rate", bandBaseKm: "0", bandTopKm: "2", bandReference: "msl", groupBy: "site" }), database));
    const mslSites = msl instanceof ClimatologyQueryError ? [] : msl.groups.map((g) => g.key);
    const highSites = (await database.db.site.findMany({ where: { elevationM: { gt: 1000 } } })).map((s) => s.id);
    expect(highSites.length).toBeGreaterThan(0);
    for (const id of highSites) {
      expect(agl.groups.map((g) => g.key)).toContain(id);
      expect(mslSites).not.toContain(id);
    }
  });

  test("stored fixed bands keep the band as asked and the range fitted: 0–2000 m AGL at a high site starts at its ground", async () => {
    const site = await database.db.site.findFirstOrThrow({ where: { elevationM: { gt: 1500 } } });
    const summary = await database.db.flightSummary.findFirstOrThrow({ where: { siteId: site.id, isCurrent: true, qcFlagged: false } });
    expect(summary.groundElevationM).toBe(site.elevationM);
    const bands = await database.db.layerStat.findMany({ where: { runId: summary.runId, kind: "band", phase: "ascent" }, orderBy: { bandBaseM: "asc" } });
    const agl = bands.find((b) => b.bandReference === "agl");
    expect(agl).toMatchObject({ bandBaseM: 0, bandTopM: 2000, groundElevationM: site.elevationM, baseM: site.elevationM, topM: site.elevationM + 2000 });
    expect((agl?.fittedBaseM ?? 0) - site.elevationM).toBeGreaterThanOrEqual(0);
    expect((agl?.fittedBaseM ?? 0) - site.elevationM).toBeLessThanOrEqual(100);
    expect((agl?.fittedTopM ?? 0) - site.elevationM).toBeGreaterThan(1900);
    expect(agl?.levelCount).toBeGreaterThanOrEqual(19);
    expect(bands.filter((b) => b.bandReference === "msl").map((b) => [b.bandBaseM, b.bandTopM, b.groundElevationM])).toEqual([[2000, 5000, null], [5000, 10000, null]]);
  });

  test("bad input: unknown ids, contradictory filters, band base above top, empty claim groups", async () => {
    await expect(getClimatology(LOCAL, query({ site: "no-such-site" }), database)).rejects.toMatchObject({ code: "unknown-reference", field: "site" });
    await expect(getClimatology(LOCAL, query({ school: "no-such-school" }), database)).rejects.toMatchObject({ code: "unknown-reference", field: "school" });
    expect(climatologyQuerySchema.safeParse({ metric: "band-lapse-rate", bandBaseKm: "6", bandTopKm: "1" }).success).toBe(false);
    expect(climatologyQuerySchema.safeParse({ season: "JJA", months: "Dec-Feb" }).success).toBe(false);
    expect(climatologyQuerySchema.safeParse({ from: "2024-05-01", to: "2024-01-01" }).success).toBe(false);
    expect(climatologyQuerySchema.safeParse({ claim: "two-group", groupA: "JJA", groupB: "Jul-Sep" }).success).toBe(false);
    await expect(
      getClimatology(LOCAL, query({ claim: "two-group", groupA: "JJA", groupB: "Oct-Nov", years: "1999" }), database),
    ).rejects.toMatchObject({ code: "no-flights" });
    // Group A exists, group B has no flight once the months filter leaves only summer months.
    await expect(
      getClimatology(LOCAL, query({ claim: "two-group", groupA: "JJA", groupB: "Oct-Nov", months: "Jun-Aug" }), database),
    ).rejects.toMatchObject({ code: "empty-group", field: "groupB" });
  });

  test("one-sample claim uses every matching flight; the API numbers equal the page's", async () => {
    const result = await getClimatology(LOCAL, query({ claim: "one-sample", claimValue: "6.5" }), database);
    expect(result.claim?.groups[0]?.n).toBe(result.overall.n);
    expect(result.claim?.estimate).toBeCloseTo(result.overall.mean as number, 12);
  });

  test("visibilitySql keeps exactly the flights flightVisibilityWhere keeps, for every kind of viewer", async () => {
    const flights = await database.db.flight.findMany({ orderBy: { launchAtUtc: "asc" }, select: { id: true, schoolId: true } });
    const schools = [...new Set(flights.map((f) => f.schoolId))];
    // Fixture: every flight shared with the program (the demo loader makes them public), then mix
    // visibilities and soft-delete some.
    await database.db.flight.updateMany({ data: { visibility: "program" } });
    const plan: Array<{ visibility: string; deleted?: boolean }> = [
      { visibility: "school" }, { visibility: "school" }, { visibility: "public" }, { visibility: "public", deleted: true },
      { visibility: "program", deleted: true }, { visibility: "school" }, { visibility: "public" },
    ];
    for (let i = 0; i < plan.length; i++) {
      const f = flights[i * 3];
      const p = plan[i];
      if (!f || !p) continue;
      await database.db.flight.update({ where: { id: f.id }, data: { visibility: p.visibility, deletedAt: p.deleted ? new Date("2025-01-01T00:00:00Z") : null } });
    }
    const member = (userId: string, isProgramAdmin: boolean, schoolIds: string[]) =>
      ({ kind: "member", userId, isProgramAdmin, schoolIds, memberships: schoolIds.map((schoolId) => ({ schoolId, role: "reader" })) }) as Viewer;
    const viewers: Viewer[] = [
      { kind: "local" },
      { kind: "anonymous" },
      member("u1", false, []),
      member("u2", false, [schools[0] as string]),
      member("u3", false, schools.slice(0, 2)),
      member("u4", true, []),
    ];
    const counts: number[] = [];
    for (const viewer of viewers) {
      const viaPrisma = (await database.db.flight.findMany({ where: flightVisibilityWhere(viewer), select: { id: true } })).map((f) => f.id).sort();
      const condition = visibilitySql(viewer, "f");
      const viaSql = (await database.db.$queryRaw<Array<{ id: string }>>(Prisma.sql`SELECT f."id" AS id FROM "Flight" f WHERE ${condition}`)).map((r) => r.id).sort();
      expect(viaSql, viewer.kind).toEqual(viaPrisma);
      counts.push(viaSql.length);
    }
    // The fixture separates the viewers: anonymous sees only the public, undeleted flights.
    expect(counts[1]).toBe(2);
    expect(new Set(counts).size).toBeGreaterThan(2);
    // And the climatology query applies the rule: an anonymous viewer's query counts 2 flights.
    const anonymous = await getClimatology({ kind: "anonymous" }, query({ groupBy: "none", qc: "include" }), database);
    expect(anonymous.matchedFlightCount).toBe(2);
  });
});

/** Planted difference: generated flights whose lapse rate is drawn per group, uploaded through the real ingest. */
describe.each(testEngines())("claim check on generated flights on %s", (engine) => {
  let database: TestDatabase;
  // Seed 2024 (mulberry32) draws each flight's lapse rate: July 7.0 and April 7.0 K/km (no difference),
  // October–November 6.0 K/km (planted difference of 1 K/km), each with SD 0.3 K/km.
  const SEED = 2024;
  const plan = [
    ...[3, 6, 9, 12, 15, 18, 21, 24, 27].map((day) => ({ month: 7, day, meanKPerKm: 7.0 })),
    ...[4, 8, 12, 16, 20, 24, 28, 30, 2].map((day, i) => ({ month: i < 8 ? 4 : 5, day, meanKPerKm: 7.0 })),
    ...[5, 10, 15, 20, 25, 30, 4, 9, 14].map((day, i) => ({ month: i < 6 ? 10 : 11, day, meanKPerKm: 6.0 })),
  ];

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    const ids = await setUpSchool(database.db, "Planted Difference School");
    const rng = mulberry32(SEED);
    const normal = () => Math.sqrt(-2 * Math.log(Math.max(rng(), 1e-12))) * Math.cos(2 * Math.PI * rng());
    for (const [i, flight] of plan.entries()) {
      const params: FlightProfileParams = {
        atmosphere: {
          surfaceAltitudeM: 200, surfaceTemperatureK: 285, lapseRateKPerKm: flight.meanKPerKm + 0.3 * normal(),
          tropopauseAltitudeM: 11_000, isothermalDepthM: 4000, stratosphereWarmingKPerKm: 1,
          surfaceInversion: null, elevatedInversion: null, surfacePressureHpa: 990, surfaceHumidityPct: 60,
          windEastMPerS: 3, windNorthMPerS: 1, jetEastMPerS: 20,
        },
        latitudeDeg: 48.1, longitudeDeg: 9.2, ascentRateMPerS: 5, burstAltitudeM: 14_000,
        descent: null, preLaunchS: 60, postLandingS: 0, sampleIntervalS: 4, sensorTimeConstantS: 1, sensorNoiseK: 0.1,
        gpsSpikeCount: 0, hasPressure: false, hasHumidity: false,
      };
      const profile = generateFlightProfile(params, SEED + i);
      const startMs = Date.UTC(2024, flight.month - 1, flight.day, 8, 0, 0);
      const text = renderLoggerFile(COMMA_COUNTS_LAYOUT, profile.samples, { calibration: LINEAR_10BIT_CALIBRATION, fileStartUtcMs: startMs });
      await ingestFlightFile(database.db, {
        file: { name: `planted-${i}.csv`, bytes: new TextEncoder().encode(text) },
        metadata: { schoolId: ids.school.id, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc: new Date(startMs + 60_000).toISOString() },
      });
    }
  }, 300_000);
  afterAll(async () => {
    await database?.drop();
  });

  test("the planted difference (July vs Oct–Nov) is found", async () => {
    const result = await getClimatology(LOCAL, query({ metric: "band-lapse-rate", bandBaseKm: "1", bandTopKm: "6", claim: "two-group", groupA: "Jul", groupB: "Oct-Nov", claimSide: "greater" }), database);
    expect(result.groups.map((g) => g.n)).toEqual([9, 9]);
    expect(result.claim?.outcome).toBe("supported");
    expect(result.claim?.p).toBeLessThan(0.001);
    // [D] planted 7.0 − 6.0 K/km; nine draws per group with SD 0.3 leave the estimate within 0.5 K/km of it
    expect(Math.abs((result.claim?.estimate ?? 0) - 1.0)).toBeLessThan(0.5);
  });

  test("no difference is found where none was planted (April–May vs July)", async () => {
    const result = await getClimatology(LOCAL, query({ metric: "band-lapse-rate", bandBaseKm: "1", bandTopKm: "6", claim: "two-group", groupA: "Apr-May", groupB: "Jul", claimSide: "two-sided" }), database);
    expect(result.claim?.outcome).toBe("not-shown");
    expect(result.claim?.p).toBeGreaterThan(0.05);
    expect(result.claim?.caveats.map((c) => c.code)).toContain("small-n");
    expect(result.claim?.caveats.map((c) => c.code)).toContain("one-site");
  });
});
