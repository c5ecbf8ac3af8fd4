/**
 * Climatology at scale, timed as a user waits for it, next to a peer engine (issue 14).
 * One run, on SQLite and on PostgreSQL, with the synthetic archive (seed/synthetic-archive,
 * LAPSEBANK_BENCH_FLIGHTS, default 10,000):
 * - peer baseline: the same levels and summaries loaded into DuckDB in memory (@duckdb/node-api, a dev
 *   dependency used only here), where the same band lapse rate (per-flight least squares over the band,
 *   then statistics per season) and the same grouped summary run as SQL;
 * - Lapsebank's own queries through the real code path (getClimatology) and the ratio to DuckDB
 *   (target ≤ 1× for the band query);
 * - the production server (lib/cli/app-server.mjs, as `npm start`) answering /api/v1/climatology cold
 *   (the climatology cache is emptied before every request by bumping the archive revision, which is
 *   what any change to the archive does), p50/p95 over several metric/grouping/filter combinations
 *   (target p95 ≤ 300 ms);
 * - the Climatology page: HTML bytes (≤ 300 KB) and, in Debian's Chromium via playwright-core, DOM
 *   nodes (≤ 15,000), time to the statistics table (≤ 1 s) and to network idle (≤ 2 s), cold.
 * Needs a production build matching the sources (built here when .next/BUILD_ID is missing).
 * Not part of CI: `npm run bench scale`.
 */
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { DuckDBInstance, type DuckDBConnection } from "@duckdb/node-api";
import { chromium } from "playwright-core";
import type { DbHandle } from "../../lib/db/index.ts";
import { getClimatology } from "../../lib/query/climatology-core.ts";
import { writeSyntheticArchive } from "../../seed/synthetic-archive.ts";
import { CHROMIUM_PATH } from "../support/e2e-browser.ts";
import { freeLoopbackPort } from "../support/free-port.ts";
import { percentile, query, timeRuns, withPostgres, withSqlite } from "./climatology.bench.ts";
import type { BenchResult } from "./types.ts";

const FLIGHTS = Number(process.env.LAPSEBANK_BENCH_FLIGHTS ?? 10_000);
const BAND_BASE_M = 1000;
const BAND_TOP_M = 6000;
const CORE_RUNS = 5;
const HTTP_ROUNDS = 4;
const PAGE_RUNS = 3;
/** Rows copied from the database into DuckDB per read (keeps the bench's memory bounded). */
const COPY_PAGE_ROWS = 200_000;

/** The API combinations timed cold: every metric family, several groupings, a filter and a claim. */
const API_QUERIES: ReadonlyArray<Record<string, string>> = [
  { metric: "tropospheric-lapse-rate", groupBy: "season" },
  { metric: "band-lapse-rate", bandBaseKm: "1", bandTopKm: "6", groupBy: "season" },
  { metric: "band-lapse-rate", bandBaseKm: "2", bandTopKm: "8", bandReference: "agl", groupBy: "site", season: "JJA" },
  { metric: "tropopause-altitude", groupBy: "month", claim: "two-group", groupA: "JJA", groupB: "DJF" },
  { metric: "surface-inversion-frequency", groupBy: "launch-hour", from: "2015-01-01", to: "2030-12-31" },
  { metric: "surface-temperature", groupBy: "year", flights: "none" },
];

const PAGE_QUERIES: ReadonlyArray<Record<string, string>> = [
  { metric: "tropospheric-lapse-rate", groupBy: "season" },
  { metric: "band-lapse-rate", bandBaseKm: "1", bandTopKm: "6", groupBy: "season" },
];

function search(record: Record<string, string>): string {
  return new URLSearchParams(record).toString();
}

/** Empties every app process's climatology cache: a result is reused only at the revision it was computed at. */
async function bumpRevision(handle: DbHandle): Promise<void> {
  await handle.db.$executeRawUnsafe(`UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1`);
}

// ---------------------------------------------------------------------------------------------
// DuckDB: the peer baseline

interface Duck {
  connection: DuckDBConnection;
  levels: number;
  summaries: number;
  close(): void;
}

/**
 * Copies the current ascent levels and summaries of the archive into an in-memory DuckDB. Only what
 * the two statistics need: run, altitude, temperature; flight, run, season, tropospheric lapse rate.
 */
async function loadDuck(handle: DbHandle): Promise<Duck> {
  const instance = await DuckDBInstance.create(":memory:");
  const connection = await instance.connect();
  await connection.run(`CREATE TABLE summary ("runId" VARCHAR, "flightId" VARCHAR, season VARCHAR, "troposphericLapseRateKPerKm" DOUBLE)`);
  await connection.run(`CREATE TABLE level ("runId" VARCHAR, "altitudeM" DOUBLE, "temperatureK" DOUBLE)`);
  const summaries = await handle.db.$queryRawUnsafe<Array<{ runId: string; flightId: string; season: string; lapse: number | null }>>(
    `SELECT s."runId" AS "runId", s."flightId" AS "flightId", s."season" AS "season", s."troposphericLapseRateKPerKm" AS "lapse"
     FROM "FlightSummary" s JOIN "Flight" f ON f."id" = s."flightId"
     WHERE s."isCurrent" = TRUE AND f."deletedAt" IS NULL AND s."qcFlagged" = FALSE`,
  );
  const summaryAppender = await connection.createAppender("summary");
  for (const s of summaries) {
    summaryAppender.appendVarchar(s.runId);
    summaryAppender.appendVarchar(s.flightId);
    summaryAppender.appendVarchar(s.season);
    if (s.lapse === null) summaryAppender.appendNull();
    else summaryAppender.appendDouble(Number(s.lapse));
    summaryAppender.endRow();
  }
  summaryAppender.closeSync();
  const levelAppender = await connection.createAppender("level");
  let levels = 0;
  let afterId = -1;
  for (;;) {
    const rows = await handle.db.$queryRawUnsafe<Array<{ id: number; runId: string; altitudeM: number; temperatureK: number }>>(
      `SELECT l."id" AS "id", l."runId" AS "runId", l."altitudeM" AS "altitudeM", l."temperatureK" AS "temperatureK"
       FROM "ProfileLevel" l JOIN "AnalysisRun" r ON r."id" = l."runId"
       WHERE r."isCurrent" = TRUE AND l."phase" = 'ascent' AND l."id" > ${afterId} ORDER BY l."id" LIMIT ${COPY_PAGE_ROWS}`,
    );
    for (const r of rows) {
      levelAppender.appendVarchar(r.runId);
      levelAppender.appendDouble(Number(r.altitudeM));
      levelAppender.appendDouble(Number(r.temperatureK));
      levelAppender.endRow();
    }
    levels += rows.length;
    if (rows.length < COPY_PAGE_ROWS) break;
    afterId = Number(rows[rows.length - 1]!.id);
  }
  levelAppender.closeSync();
  return { connection, levels, summaries: summaries.length, close: () => { connection.closeSync(); instance.closeSync(); } };
}

/** Statistics per season as Lapsebank reports them (n, mean, SD, median, quartiles, min, max). */
const DUCK_STATS = `count(v) AS n, avg(v) AS mean, stddev_samp(v) AS sd, quantile_cont(v, 0.5) AS median,
  quantile_cont(v, 0.25) AS q1, quantile_cont(v, 0.75) AS q3, min(v) AS min, max(v) AS max`;

/** The band lapse rate in DuckDB: −slope of the least-squares line T(z) per flight over the band, ×1000 (K/km). */
const DUCK_BAND_SQL = `WITH band AS (
    SELECT "runId", -1000 * regr_slope("temperatureK", "altitudeM") AS v, count(*) AS levels
    FROM level WHERE "altitudeM" >= ${BAND_BASE_M} AND "altitudeM" <= ${BAND_TOP_M} GROUP BY "runId" HAVING count(*) >= 3)
  SELECT s.season, ${DUCK_STATS} FROM band b JOIN summary s ON s."runId" = b."runId" GROUP BY s.season ORDER BY s.season`;

const DUCK_SUMMARY_SQL = `SELECT season, ${DUCK_STATS} FROM (SELECT season, "troposphericLapseRateKPerKm" AS v FROM summary WHERE "troposphericLapseRateKPerKm" IS NOT NULL)
  GROUP BY season ORDER BY season`;

async function duckFlights(duck: Duck, statement: string): Promise<number> {
  const reader = await duck.connection.runAndReadAll(statement);
  return reader.getRowObjectsJS().reduce((sum, row) => sum + Number(row.n), 0);
}

// ---------------------------------------------------------------------------------------------
// The production server and Chromium

async function startServer(url: string, engine: DbHandle["engine"]): Promise<{ base: string; stop(): Promise<void> }> {
  if (!fs.existsSync(".next/BUILD_ID")) {
    const build = spawnSync("node_modules/.bin/next", ["build"], { stdio: "inherit" });
    if (build.status !== 0) throw new Error("next build failed");
  }
  const port = await freeLoopbackPort();
  const base = `http://127.0.0.1:${port}`;
  // One app process: a request's time is then one process's work, on SQLite as on PostgreSQL.
  const server: ChildProcess = spawn(process.execPath, [path.resolve("lib/cli/app-server.mjs")], {
    env: { ...process.env, DATABASE_URL: url, NODE_ENV: "production", PORT: String(port), HOST: "127.0.0.1", LAPSEBANK_APP_PROCESSES: "1" },
    stdio: "ignore",
    detached: true,
  });
  let up = false;
  for (let i = 0; i < 240 && !up; i++) {
    try {
      up = (await fetch(`${base}/api/v1/flights?pageSize=1`)).ok;
    } catch {
      // starting
    }
    if (!up) await new Promise((r) => setTimeout(r, 250));
  }
  if (!up) throw new Error(`the ${engine} app server did not start`);
  return {
    base,
    stop: async () => {
      if (server.pid) {
        try {
          process.kill(-server.pid, "SIGTERM");
        } catch {
          // gone
        }
      }
      await new Promise((r) => setTimeout(r, 500));
    },
  };
}

interface PageFigures {
  htmlBytes: number;
  domNodes: number;
  firstStatisticsMs: number;
  networkIdleMs: number;
  /** Where the nodes and bytes go: chart point links, flight-table rows, bytes of inline scripts (the RSC payload). */
  pointLinks: number;
  flightRows: number;
  inlineScriptBytes: number;
}

async function measurePage(base: string, handle: DbHandle, record: Record<string, string>): Promise<PageFigures[]> {
  const url = `${base}/climatology?${search(record)}`;
  const browser = await chromium.launch({ executablePath: CHROMIUM_PATH, headless: true, args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update", "--disable-sync", "--no-first-run"] });
  try {
    const context = await browser.newContext({ viewport: { width: 1280, height: 900 }, locale: "en-GB", timezoneId: "UTC" });
    // Loopback only: nothing the page asks for may leave the machine.
    await context.route("**/*", (route) => (new URL(route.request().url()).hostname === "127.0.0.1" ? route.continue() : route.abort("blockedbyclient")));
    const out: PageFigures[] = [];
    for (let i = 0; i <= PAGE_RUNS; i++) {
      await bumpRevision(handle);
      const htmlResponse = await fetch(url);
      const htmlBytes = (await htmlResponse.arrayBuffer()).byteLength;
      if (!htmlResponse.ok) throw new Error(`${url}: HTTP ${htmlResponse.status}`);
      await bumpRevision(handle);
      const page = await context.newPage();
      const t0 = performance.now();
      await page.goto(url, { waitUntil: "commit" });
      await page.locator("table caption", { hasText: "per group" }).first().waitFor({ state: "visible", timeout: 180_000 });
      const firstStatisticsMs = performance.now() - t0;
      await page.waitForLoadState("networkidle", { timeout: 180_000 });
      const networkIdleMs = performance.now() - t0;
      const { domNodes, pointLinks, flightRows, inlineScriptBytes } = await page.evaluate(() => ({
        domNodes: document.getElementsByTagName("*").length,
        pointLinks: document.querySelectorAll("a.chart-point-link").length,
        flightRows: document.querySelectorAll("details.group-flights tbody tr").length,
        inlineScriptBytes: [...document.querySelectorAll("script:not([src])")].reduce((sum, el) => sum + (el.textContent?.length ?? 0), 0),
      }));
      await page.close();
      if (i > 0) out.push({ htmlBytes, domNodes, firstStatisticsMs, networkIdleMs, pointLinks, flightRows, inlineScriptBytes }); // the first run warms the server's code
    }
    return out;
  } finally {
    await browser.close();
  }
}

// ---------------------------------------------------------------------------------------------

async function benchEngine(engine: DbHandle["engine"], handle: DbHandle): Promise<BenchResult[]> {
  const t0 = performance.now();
  const report = await writeSyntheticArchive(handle, { flights: FLIGHTS });
  // The throw-away cluster runs without autovacuum; a production server keeps planner statistics fresh.
  if (engine === "postgres") await handle.db.$executeRawUnsafe("ANALYZE");
  const writtenS = (performance.now() - t0) / 1000;
  const results: BenchResult[] = [{ name: `scale ${engine}: synthetic archive written`, value: writtenS, unit: "s", note: `${report.flights} flights, ${report.levels} levels` }];

  const t1 = performance.now();
  const duck = await loadDuck(handle);
  results.push({ name: `scale ${engine}: DuckDB loaded (in memory, same rows)`, value: (performance.now() - t1) / 1000, unit: "s", note: `${duck.summaries} summaries, ${duck.levels} ascent levels` });
  try {
    const viewer = { kind: "local" } as const;
    const band = query({ metric: "band-lapse-rate", bandBaseKm: String(BAND_BASE_M / 1000), bandTopKm: String(BAND_TOP_M / 1000), groupBy: "season", flights: "none" });
    const summary = query({ metric: "tropospheric-lapse-rate", groupBy: "season", flights: "none" });
    let lapsebankBandN = 0;
    let duckBandN = 0;
    let lapsebankSummaryN = 0;
    let duckSummaryN = 0;
    const bandTimes = await timeRuns(CORE_RUNS, 1, async () => {
      lapsebankBandN = (await getClimatology(viewer, band, handle, { profiles: false })).overall.n;
    });
    const duckBandTimes = await timeRuns(CORE_RUNS, 1, async () => {
      duckBandN = await duckFlights(duck, DUCK_BAND_SQL);
    });
    const summaryTimes = await timeRuns(CORE_RUNS * 4, 2, async () => {
      lapsebankSummaryN = (await getClimatology(viewer, summary, handle, { profiles: false })).overall.n;
    });
    const duckSummaryTimes = await timeRuns(CORE_RUNS * 4, 2, async () => {
      duckSummaryN = await duckFlights(duck, DUCK_SUMMARY_SQL);
    });
    const bandMs = percentile(bandTimes, 0.5);
    const duckBandMs = percentile(duckBandTimes, 0.5);
    const summaryMs = percentile(summaryTimes, 0.5);
    const duckSummaryMs = percentile(duckSummaryTimes, 0.5);
    results.push(
      { name: `scale ${engine}: band 1–6 km by season, getClimatology (median)`, value: bandMs, unit: "ms", note: `${lapsebankBandN} flights; statistics only, no mean profiles` },
      { name: `scale ${engine}: band 1–6 km by season, DuckDB (median)`, value: duckBandMs, unit: "ms", note: `${duckBandN} flights (≥ 3 levels in band; Lapsebank's coverage rule is stricter)` },
      { name: `scale ${engine}: band Lapsebank / DuckDB`, value: bandMs / duckBandMs, unit: "ratio", note: `target ≤ 1; ${bandMs / duckBandMs <= 1 ? "met" : "NOT met"}` },
      { name: `scale ${engine}: grouped summary by season, getClimatology (median)`, value: summaryMs, unit: "ms", note: `${lapsebankSummaryN} flights; tropospheric lapse rate` },
      { name: `scale ${engine}: grouped summary by season, DuckDB (median)`, value: duckSummaryMs, unit: "ms", note: `${duckSummaryN} flights` },
      { name: `scale ${engine}: grouped summary Lapsebank / DuckDB`, value: summaryMs / duckSummaryMs, unit: "ratio" },
    );
  } finally {
    duck.close();
  }

  const server = await startServer(handle.url, engine);
  try {
    // Warm the server's code (not its cache) once per query.
    for (const record of API_QUERIES) await (await fetch(`${server.base}/api/v1/climatology?${search(record)}`)).arrayBuffer();
    const all: number[] = [];
    const byQuery = API_QUERIES.map(() => [] as number[]);
    let errors = 0;
    let largestBytes = 0;
    for (let round = 0; round < HTTP_ROUNDS; round++) {
      for (const [i, record] of API_QUERIES.entries()) {
        await bumpRevision(handle);
        const started = performance.now();
        const response = await fetch(`${server.base}/api/v1/climatology?${search(record)}`);
        const bytes = (await response.arrayBuffer()).byteLength;
        const ms = performance.now() - started;
        if (!response.ok) errors++;
        largestBytes = Math.max(largestBytes, bytes);
        all.push(ms);
        byQuery[i]!.push(ms);
      }
    }
    all.sort((a, b) => a - b);
    const p95 = percentile(all, 0.95);
    results.push(
      { name: `scale ${engine}: cold /api/v1/climatology p50`, value: percentile(all, 0.5), unit: "ms", note: `${all.length} requests, ${API_QUERIES.length} combinations × ${HTTP_ROUNDS}, cache emptied before each` },
      { name: `scale ${engine}: cold /api/v1/climatology p95`, value: p95, unit: "ms", note: `target ≤ 300 ms; ${p95 <= 300 ? "met" : "NOT met"}; errors ${errors}; largest body ${(largestBytes / 1024).toFixed(0)} KB` },
      { name: `scale ${engine}: cold API median per combination`, value: 0, unit: "-", note: API_QUERIES.map((r, i) => `${r.metric}/${r.groupBy}: ${percentile(byQuery[i]!.sort((a, b) => a - b), 0.5).toFixed(0)} ms`).join("; ") },
    );

    for (const record of PAGE_QUERIES) {
      const runs = await measurePage(server.base, handle, record);
      const label = `${record.metric}/${record.groupBy}`;
      const last = runs[runs.length - 1]!;
      const html = Math.max(...runs.map((r) => r.htmlBytes));
      const dom = Math.max(...runs.map((r) => r.domNodes));
      const first = percentile(runs.map((r) => r.firstStatisticsMs).sort((a, b) => a - b), 0.5);
      const idle = percentile(runs.map((r) => r.networkIdleMs).sort((a, b) => a - b), 0.5);
      results.push(
        { name: `scale ${engine}: page ${label}: HTML`, value: html / 1024, unit: "KB", note: `target ≤ 300 KB; ${html <= 300 * 1024 ? "met" : "NOT met"}; inline scripts ${(last.inlineScriptBytes / 1024).toFixed(0)} KB` },
        { name: `scale ${engine}: page ${label}: DOM nodes`, value: dom, unit: "nodes", note: `target ≤ 15,000; ${dom <= 15_000 ? "met" : "NOT met"}; ${last.pointLinks} chart point links, ${last.flightRows} flight-table rows` },
        { name: `scale ${engine}: page ${label}: statistics table shown (median, cold)`, value: first, unit: "ms", note: `target ≤ 1000 ms; ${first <= 1000 ? "met" : "NOT met"}; Chromium, ${runs.length} runs` },
        { name: `scale ${engine}: page ${label}: network idle (median, cold)`, value: idle, unit: "ms", note: `target ≤ 2000 ms; ${idle <= 2000 ? "met" : "NOT met"}` },
      );
    }
  } finally {
    await server.stop();
  }
  return results;
}

export async function benchScale(): Promise<BenchResult[]> {
  if (!fs.existsSync(CHROMIUM_PATH)) throw new Error(`${CHROMIUM_PATH} is missing: install Debian's chromium`);
  const results: BenchResult[] = [];
  results.push(...(await withSqlite((handle) => benchEngine("sqlite", handle))));
  if (process.env.LAPSEBANK_BENCH_SKIP_POSTGRES === "1") {
    results.push({ name: "scale postgres", value: 0, unit: "skipped", note: "LAPSEBANK_BENCH_SKIP_POSTGRES=1" });
  } else {
    results.push(...(await withPostgres((handle) => benchEngine("postgres", handle))));
  }
  return results;
}
