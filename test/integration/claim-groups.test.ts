import jStat from "jstat";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Viewer } from "../../lib/auth/visibility.ts";
import { getClimatology } from "../../lib/query/climatology.ts";
import { flightInClaimGroup, parseClaimGroup, parseClimatologyQuery } from "../../lib/query/climatology-params.ts";
import { generateDemoProgram } from "../../seed/demo-program.ts";
import { loadDemoProgram } from "../../seed/load.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

const LOCAL: Viewer = { kind: "local" };

function query(record: Record<string, string>) {
  const parsed = parseClimatologyQuery(record);
  if (!parsed.ok) throw new Error(parsed.message);
  return parsed.query;
}

/** The first flights of every invented demo site. */
function demoSubset() {
  const program = generateDemoProgram();
  const chosen = new Set<string>();
  for (const site of program.sites) program.flights.filter((f) => f.siteKey === site.key).slice(0, 6).forEach((f) => chosen.add(f.key));
  return { ...program, flights: program.flights.filter((f) => chosen.has(f.key)) };
}

describe.each(testEngines())("claims on any grouping on %s", (engine) => {
  let database: TestDatabase;

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    const report = await loadDemoProgram(database.db, { program: demoSubset() });
    expect(report.failures).toEqual([]);
  }, 300_000);
  afterAll(async () => {
    await database?.drop();
  });

  /** Flights with a tropospheric lapse rate that pass the default filters, as plain rows. */
  async function candidates() {
    const rows = await database.db.flightSummary.findMany({ where: { isCurrent: true, qcFlagged: false, flight: { deletedAt: null }, troposphericLapseRateKPerKm: { not: null } } });
    return rows.map((r) => ({
      flightId: r.flightId,
      siteId: r.siteId,
      schoolId: r.schoolId,
      year: r.year,
      month: r.month,
      seasonName: r.seasonName,
      localHour: r.localHour,
      hoursAfterSunrise: r.hoursAfterSunrise,
    }));
  }

  /** Runs the claim and checks each group's flights are those the groups' JS reading picks from the rows. */
  async function checkGroups(groupA: string, groupB: string) {
    const rows = await candidates();
    const result = await getClimatology(LOCAL, query({ claim: "two-group", groupA, groupB }), database);
    const a = parseClaimGroup(groupA);
    const b = parseClaimGroup(groupB);
    const expectedA = rows.filter((r) => flightInClaimGroup(a, r)).map((r) => r.flightId).sort();
    const expectedB = rows.filter((r) => flightInClaimGroup(b, r)).map((r) => r.flightId).sort();
    expect(expectedA.length).toBeGreaterThan(0);
    expect(expectedB.length).toBeGreaterThan(0);
    const got = (key: string) => (result.groups.find((g) => g.key === key)?.flights ?? []).map((f) => f.flightId).sort();
    expect(got("A")).toEqual(expectedA);
    expect(got("B")).toEqual(expectedB);
    expect(result.claim?.groups.map((g) => g.n)).toEqual([expectedA.length, expectedB.length]);
    return result;
  }

  test("site against site selects each site's flights and names the sites", async () => {
    const sites = await database.db.site.findMany({ orderBy: { id: "asc" } });
    const [s1, s2] = sites;
    if (!s1 || !s2) throw new Error("the demo program needs two sites");
    const result = await checkGroups(`site:${s1.id}`, `site:${s2.id}`);
    expect(result.claim?.groups.map((g) => g.label)).toEqual([s1.name, s2.name]);
    expect(result.claim?.verdict).toContain(s1.name);
  });

  test("school against school", async () => {
    const schools = await database.db.school.findMany({ orderBy: { id: "asc" } });
    if (schools.length < 2) return expect(schools.length).toBe(1);
    await checkGroups(`school:${schools[0]?.id}`, `school:${schools[1]?.id}`);
  });

  test("year against year, and launch-hour ranges", async () => {
    const rows = await candidates();
    const years = [...new Set(rows.map((r) => r.year))].sort();
    if (years.length >= 2) await checkGroups(`year:${years[0]}`, `year:${years[years.length - 1]}`);
    const hours = rows.map((r) => r.localHour).sort((x, y) => x - y);
    const middle = Math.floor(hours[Math.floor(hours.length / 2)] ?? 12);
    await checkGroups(`hour:0-${middle}`, `hour:${middle}-24`);
  });

  test("a filter set (site and hour range) against another site", async () => {
    const sites = await database.db.site.findMany({ orderBy: { id: "asc" } });
    const [s1, s2] = sites;
    if (!s1 || !s2) throw new Error("the demo program needs two sites");
    await checkGroups(`site:${s1.id}; hour:0-24`, `site:${s2.id}; sunrise:-24-24`);
  });

  test("groups that share flights in the data are refused; unknown ids are refused", async () => {
    const rows = await candidates();
    const first = rows[0];
    if (!first) throw new Error("no flights");
    await expect(
      getClimatology(LOCAL, query({ claim: "two-group", groupA: `site:${first.siteId}`, groupB: `year:${first.year}` }), database),
    ).rejects.toMatchObject({ code: "overlapping-groups", field: "groupB" });
    await expect(getClimatology(LOCAL, query({ claim: "two-group", groupA: "site:no-such-site", groupB: "summer" }), database)).rejects.toMatchObject({
      code: "unknown-reference",
      field: "groupA",
    });
  });

  test("cross-table season × site: each cell's n, mean and CI equal a direct computation", async () => {
    const rows = await candidates();
    const result = await getClimatology(LOCAL, query({ groupBy: "season", crossBy: "site" }), database);
    const table = result.crossTable;
    if (!table) throw new Error("no cross-table");
    expect(table.by).toBe("site");
    const expected = new Map<string, number[]>();
    const values = await database.db.flightSummary.findMany({ where: { isCurrent: true, qcFlagged: false, troposphericLapseRateKPerKm: { not: null } } });
    for (const r of values) {
      const key = `${r.seasonName}|${r.siteId}`;
      expected.set(key, [...(expected.get(key) ?? []), r.troposphericLapseRateKPerKm as number]);
    }
    expect(table.cells.length).toBe(expected.size);
    expect(table.cells.reduce((s, c) => s + c.n, 0)).toBe(rows.length);
    for (const cell of table.cells) {
      const v = expected.get(`${cell.rowKey}|${cell.columnKey}`) ?? [];
      // [D] mean and t-based 95 % CI written out here, independent of lib/stats
      const n = v.length;
      const mean = v.reduce((s, x) => s + x, 0) / n;
      expect(cell.n).toBe(n);
      expect(cell.mean).toBeCloseTo(mean, 10);
      if (n >= 2) {
        const sd = Math.sqrt(v.reduce((s, x) => s + (x - mean) ** 2, 0) / (n - 1));
        const half = jStat.studentt.inv(0.975, n - 1) * (sd / Math.sqrt(n));
        expect(cell.ci95Low).toBeCloseTo(mean - half, 9);
        expect(cell.ci95High).toBeCloseTo(mean + half, 9);
      }
    }
    const sites = await database.db.site.findMany();
    expect(table.columns.map((c) => c.label).sort()).toEqual(sites.filter((s) => values.some((v) => v.siteId === s.id)).map((s) => s.name).sort());
    expect(parseClimatologyQuery({ groupBy: "site", crossBy: "site" }).ok).toBe(false);
  });

  test("an equals claim with a tolerance is tested as equivalence", async () => {
    const result = await getClimatology(LOCAL, query({ claim: "one-sample", claimValue: "6.5", claimTolerance: "3" }), database);
    expect(result.claim?.tolerance).toBe(3);
    expect(result.claim?.equivalence).not.toBeNull();
    expect(["equivalent", "contradicted", "inconclusive"]).toContain(result.claim?.outcome);
  });
});
