/**
 * Climatology at scale: a synthetic archive of 10,000 flights (~300 levels each, seed/synthetic-archive)
 * on SQLite and on PostgreSQL. Reports the grouped summary query p50/p95 (target p95 ≤ 100 ms), the
 * band lapse rate 1–6 km at query time over all flights (target ≤ 1.5 s SQLite, ≤ 1 s PostgreSQL),
 * and, measured in the same run, a baseline that reads the same level rows into memory and computes
 * the band in JS (computeBandLapseRate), with the ratio SQL/baseline.
 * PostgreSQL: LAPSEBANK_BENCH_POSTGRES_URL or LAPSEBANK_TEST_POSTGRES_URL (a server URL whose user may
 * create databases); otherwise a throw-away cluster is started with test/support/postgres.sh.
 */
import { execFileSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import pg from "pg";
import { computeBandLapseRate } from "../../lib/analysis/layers.ts";
import type { ProfileLevel } from "../../lib/analysis/types.ts";
import { createDb, Prisma, type DbHandle } from "../../lib/db/index.ts";
import { applyMigrations } from "../../lib/db/migrate.ts";
import { getClimatology } from "../../lib/query/climatology-core.ts";
import { parseClimatologyQuery } from "../../lib/query/climatology-params.ts";
import { writeSyntheticArchive } from "../../seed/synthetic-archive.ts";
import type { BenchResult } from "./types.ts";

const FLIGHTS = Number(process.env.LAPSEBANK_BENCH_FLIGHTS ?? 10_000);
const SUMMARY_RUNS = 40;
const BAND_RUNS = 5;
const BAND_BASE_M = 1000;
const BAND_TOP_M = 6000;

export function percentile(sortedMs: readonly number[], p: number): number {
  const index = Math.min(sortedMs.length - 1, Math.max(0, Math.ceil(p * sortedMs.length) - 1));
  return sortedMs[index] ?? Number.NaN;
}

export async function timeRuns(runs: number, warmUp: number, fn: () => Promise<unknown>): Promise<number[]> {
  for (let i = 0; i < warmUp; i++) await fn();
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    await fn();
    times.push(performance.now() - t0);
  }
  return times.sort((a, b) => a - b);
}

export function query(record: Record<string, string>) {
  const parsed = parseClimatologyQuery(record);
  if (!parsed.ok) throw new Error(parsed.message);
  return parsed.query;
}

/** Baseline: the same in-band levels read into memory, grouped per run in JS and fitted with computeBandLapseRate. */
async function bandInJs(handle: DbHandle): Promise<number> {
  const statement = Prisma.sql`SELECT l."runId" AS "runId", l."altitudeM" AS "altitudeM", l."baseM" AS "baseM", l."topM" AS "topM", l."temperatureK" AS "temperatureK"
    FROM "ProfileLevel" l JOIN "FlightSummary" s ON s."runId" = l."runId" JOIN "Flight" f ON f."id" = s."flightId"
    WHERE s."isCurrent" = TRUE AND f."deletedAt" IS NULL AND s."qcFlagged" = FALSE AND l."phase" = ${"ascent"}
      AND l."altitudeM" >= ${BAND_BASE_M} AND l."altitudeM" <= ${BAND_TOP_M}`;
  const rows = await handle.db.$queryRaw<Array<{ runId: string; altitudeM: number; baseM: number; topM: number; temperatureK: number }>>(statement);
  const byRun = new Map<string, ProfileLevel[]>();
  for (const r of rows) {
    const list = byRun.get(r.runId) ?? [];
    list.push({ phase: "ascent", altitudeM: r.altitudeM, baseM: r.baseM, topM: r.topM, temperatureK: r.temperatureK, sampleCount: 1, temperatureSdK: null, pressureHpa: null, relativeHumidityPct: null });
    byRun.set(r.runId, list);
  }
  let found = 0;
  for (const levels of byRun.values()) if (computeBandLapseRate(levels, BAND_BASE_M, BAND_TOP_M).layer) found++;
  return found;
}

async function benchEngine(engine: "sqlite" | "postgres", handle: DbHandle): Promise<BenchResult[]> {
  const t0 = performance.now();
  const report = await writeSyntheticArchive(handle, { flights: FLIGHTS });
  const loadS = (performance.now() - t0) / 1000;
  const grouped = query({ groupBy: "season" });
  const band = query({ metric: "band-lapse-rate", bandBaseKm: String(BAND_BASE_M / 1000), bandTopKm: String(BAND_TOP_M / 1000), groupBy: "season" });
  const viewer = { kind: "local" } as const;

  const summaryTimes = await timeRuns(SUMMARY_RUNS, 3, () => getClimatology(viewer, { ...grouped, flights: "none" }, handle, { profiles: false }));
  const listedTimes = await timeRuns(SUMMARY_RUNS, 3, () => getClimatology(viewer, grouped, handle, { profiles: false }));
  let bandFlights = 0;
  const bandTimes = await timeRuns(BAND_RUNS, 1, async () => {
    const r = await getClimatology(viewer, band, handle, { profiles: false });
    bandFlights = r.overall.n;
  });
  let baselineFlights = 0;
  const baselineTimes = await timeRuns(BAND_RUNS, 1, async () => {
    baselineFlights = await bandInJs(handle);
  });
  const bandMs = percentile(bandTimes, 0.5);
  const baselineMs = percentile(baselineTimes, 0.5);
  const target = engine === "sqlite" ? 1500 : 1000;
  return [
    { name: `climatology ${engine}: synthetic archive written`, value: loadS, unit: "s", note: `${report.flights} flights, ${report.levels} levels` },
    { name: `climatology ${engine}: grouped summary query p50`, value: percentile(summaryTimes, 0.5), unit: "ms", note: `${SUMMARY_RUNS} runs, group by season, ${report.flights} flights` },
    { name: `climatology ${engine}: grouped summary query p95`, value: percentile(summaryTimes, 0.95), unit: "ms", note: `target ≤ 100 ms; statistics per group (flights=none)` },
    { name: `climatology ${engine}: grouped query with flight lists p50`, value: percentile(listedTimes, 0.5), unit: "ms", note: "every contributing flight with title, site and launch time (as the page uses it)" },
    { name: `climatology ${engine}: grouped query with flight lists p95`, value: percentile(listedTimes, 0.95), unit: "ms" },
    { name: `climatology ${engine}: band lapse rate 1–6 km, all flights (median)`, value: bandMs, unit: "ms", note: `target ≤ ${target} ms; ${bandFlights} flights with coverage` },
    { name: `climatology ${engine}: band baseline, rows read into JS (median)`, value: baselineMs, unit: "ms", note: `${baselineFlights} flights with coverage` },
    { name: `climatology ${engine}: band SQL / JS baseline`, value: bandMs / baselineMs, unit: "ratio", note: "below 1 means SQL is faster" },
  ];
}

export async function withSqlite<T>(fn: (handle: DbHandle) => Promise<T>): Promise<T> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "lapsebank-bench-clim-"));
  const url = `file:${path.join(dir, "bench.db")}`;
  applyMigrations(url, { quiet: true });
  const handle = createDb(url);
  try {
    return await fn(handle);
  } finally {
    await handle.db.$disconnect();
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

export async function withPostgres<T>(fn: (handle: DbHandle) => Promise<T>): Promise<T> {
  let serverUrl = process.env.LAPSEBANK_BENCH_POSTGRES_URL ?? process.env.LAPSEBANK_TEST_POSTGRES_URL;
  const clusterDir = "/tmp/lapsebank-bench-clim-pg";
  let started = false;
  if (!serverUrl) {
    const printed = execFileSync("bash", ["test/support/postgres.sh", "start", clusterDir, "5447"], { encoding: "utf8" }).trim().split("\n").pop() ?? "";
    serverUrl = printed.replace(/\/lapsebank$/, "/postgres");
    started = true;
  }
  const name = `lapsebank_bench_${process.pid}`;
  const admin = new pg.Client({ connectionString: serverUrl });
  await admin.connect();
  await admin.query(`DROP DATABASE IF EXISTS "${name}"`);
  await admin.query(`CREATE DATABASE "${name}"`);
  await admin.end();
  const url = Object.assign(new URL(serverUrl), { pathname: `/${name}` }).toString();
  try {
    applyMigrations(url, { quiet: true });
    const handle = createDb(url);
    try {
      return await fn(handle);
    } finally {
      await handle.db.$disconnect();
    }
  } finally {
    const client = new pg.Client({ connectionString: serverUrl });
    await client.connect();
    await client.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
    await client.end();
    if (started) execFileSync("bash", ["test/support/postgres.sh", "stop", clusterDir]);
  }
}

export async function benchClimatology(): Promise<BenchResult[]> {
  const results: BenchResult[] = [];
  results.push(...(await withSqlite((handle) => benchEngine("sqlite", handle))));
  if (process.env.LAPSEBANK_BENCH_SKIP_POSTGRES === "1") {
    results.push({ name: "climatology postgres", value: 0, unit: "skipped", note: "LAPSEBANK_BENCH_SKIP_POSTGRES=1" });
  } else {
    results.push(...(await withPostgres((handle) => benchEngine("postgres", handle))));
  }
  return results;
}
