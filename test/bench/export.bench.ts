/**
 * Export at scale: a synthetic archive of 10,000 flights with levels (seed/synthetic-archive), exported
 * whole as a zip data package and as the levels CSV, on each engine. Reports time, output size and the
 * peak resident memory sampled during the export (targets: ≤ 10 s and ≤ 300 MB), and, measured in the
 * same run, a baseline that only reads every level row through the same driver path (no formatting,
 * no zip), with the ratio export/baseline, so the figures mean something on a busy machine.
 */
import type { BenchResult } from "./types.ts";
import type { Engine } from "../support/test-databases.ts";
import { createTestDatabase } from "../support/test-databases.ts";
import { writeSyntheticArchive } from "../../seed/synthetic-archive.ts";
import { createExport } from "../../lib/export/export.ts";
import { openLevelReader } from "../../lib/export/level-reader.ts";
import { LOCAL_VIEWER } from "../../lib/auth/visibility.ts";

const FLIGHTS = Number(process.env.LAPSEBANK_BENCH_FLIGHTS ?? 10_000);

/** Runs fn while sampling resident memory every 20 ms; returns its time and the peak RSS seen. */
async function measure(fn: () => Promise<number>): Promise<{ seconds: number; peakRssMb: number; startRssMb: number; bytes: number }> {
  let peak = process.memoryUsage().rss;
  const startRssMb = peak / 1048576;
  const timer = setInterval(() => {
    peak = Math.max(peak, process.memoryUsage().rss);
  }, 20);
  const t0 = performance.now();
  try {
    const bytes = await fn();
    return { seconds: (performance.now() - t0) / 1000, peakRssMb: Math.max(peak, process.memoryUsage().rss) / 1048576, startRssMb, bytes };
  } finally {
    clearInterval(timer);
  }
}

async function drain(body: AsyncIterable<Uint8Array>): Promise<number> {
  let bytes = 0;
  for await (const chunk of body) bytes += chunk.length;
  return bytes;
}

export async function benchExport(engines: Engine[]): Promise<BenchResult[]> {
  const results: BenchResult[] = [];
  for (const engine of engines) {
    const database = await createTestDatabase(engine);
    try {
      const report = await writeSyntheticArchive(database, { flights: FLIGHTS });
      const label = `${engine}, ${report.flights} flights, ${report.levels} levels`;
      global.gc?.();

      const baseline = await measure(async () => {
        const runIds = (await database.db.analysisRun.findMany({ where: { isCurrent: true }, select: { id: true } })).map((r) => r.id);
        const reader = openLevelReader(database);
        let rows = 0;
        try {
          for (let i = 0; i < runIds.length; i += 100) rows += (await reader.read(runIds.slice(i, i + 100))).length;
        } finally {
          await reader.close();
        }
        return rows;
      });
      results.push({ name: `baseline: read every level row (${label})`, value: baseline.seconds, unit: "s" });

      const zip = await measure(async () => drain((await createExport(database, LOCAL_VIEWER, { source: "archive", format: "package" })).body));
      results.push({ name: `data package, whole archive (${label})`, value: zip.seconds, unit: "s", note: `target ≤ 10 s; ${(zip.bytes / 1048576).toFixed(0)} MB zip; ${(zip.seconds / baseline.seconds).toFixed(1)}× baseline` });
      results.push({ name: `data package: peak RSS during export (${engine})`, value: zip.peakRssMb, unit: "MB", note: `target ≤ 300 MB; ${zip.startRssMb.toFixed(0)} MB before the export started` });

      const csv = await measure(async () => drain((await createExport(database, LOCAL_VIEWER, { source: "archive", format: "csv", table: "levels" })).body));
      results.push({ name: `levels CSV, whole archive (${label})`, value: csv.seconds, unit: "s", note: `${(csv.bytes / 1048576).toFixed(0)} MB; ${(csv.seconds / baseline.seconds).toFixed(1)}× baseline` });
      results.push({ name: `levels CSV: peak RSS during export (${engine})`, value: csv.peakRssMb, unit: "MB", note: `target ≤ 300 MB; ${csv.startRssMb.toFixed(0)} MB before the export started` });
    } finally {
      await database.drop();
    }
  }
  return results;
}
