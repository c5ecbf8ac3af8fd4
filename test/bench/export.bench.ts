/**
 * Export at scale: a synthetic archive of 10,000 flights with levels (seed/synthetic-archive),
 * exported whole by the real command (`npm run lapsebank -- export`, in its own process) as a zip
 * data package and as the levels CSV, on each engine. Reports the export time the command prints,
 * and the process's peak resident memory read from /proc (VmHWM) while it runs (targets: ≤ 10 s and
 * ≤ 300 MB). Measured in the same run:
 * - a time baseline that only reads every level row through the database driver (no formatting,
 *   no zip), with the ratio export ÷ baseline;
 * - a memory baseline: the same command exporting a single flight, i.e. Node, its export worker
 *   with tsx, Prisma and the export code loaded but no data to speak of; the difference is what the
 *   export itself holds.
 */
import { spawn } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import type { BenchResult } from "./types.ts";
import type { Engine } from "../support/test-databases.ts";
import { createTestDatabase } from "../support/test-databases.ts";
import { writeSyntheticArchive } from "../../seed/synthetic-archive.ts";
import { openLevelReader } from "../../lib/export/level-reader.ts";
import { lapsebankNodeArgs } from "../support/lapsebank-command.ts";

const FLIGHTS = Number(process.env.LAPSEBANK_BENCH_FLIGHTS ?? 10_000);

interface CommandRun {
  exportSeconds: number;
  wallSeconds: number;
  peakRssMb: number;
  outputMb: number;
}

function peakRssKb(pid: number): number {
  try {
    const match = /VmHWM:\s+(\d+) kB/.exec(fs.readFileSync(`/proc/${pid}/status`, "utf8"));
    return match ? Number(match[1]) : 0;
  } catch {
    return 0; // the process has just exited
  }
}

/** Runs `lapsebank export …` as npm would (the package.json script, without npm's own process), sampling its peak RSS. */
async function runExportCommand(databaseUrl: string, args: string[]): Promise<CommandRun> {
  const out = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "lapsebank-bench-export-")), "export.out");
  const started = performance.now();
  const child = spawn(process.execPath, [...lapsebankNodeArgs(), "export", ...args, "--out", out], {
    env: { ...process.env, DATABASE_URL: databaseUrl },
    stdio: ["ignore", "pipe", "pipe"],
  });
  let stdout = "";
  let stderr = "";
  child.stdout.on("data", (chunk) => (stdout += chunk));
  child.stderr.on("data", (chunk) => (stderr += chunk));
  let peakKb = 0;
  const timer = setInterval(() => {
    if (child.pid) peakKb = Math.max(peakKb, peakRssKb(child.pid));
  }, 20);
  const code = await new Promise<number | null>((resolve) => child.on("exit", (exitCode) => resolve(exitCode)));
  clearInterval(timer);
  const wallSeconds = (performance.now() - started) / 1000;
  if (code !== 0) throw new Error(`export ${args.join(" ")} failed (${code}): ${stderr || stdout}`);
  const seconds = /in ([\d.]+) s/.exec(stdout);
  const outputMb = fs.statSync(out).size / 1048576;
  fs.rmSync(path.dirname(out), { recursive: true, force: true });
  return { exportSeconds: seconds ? Number(seconds[1]) : wallSeconds, wallSeconds, peakRssMb: peakKb / 1024, outputMb };
}

export async function benchExport(engines: Engine[]): Promise<BenchResult[]> {
  const results: BenchResult[] = [];
  for (const engine of engines) {
    const database = await createTestDatabase(engine);
    try {
      const report = await writeSyntheticArchive(database, { flights: FLIGHTS });
      // A production PostgreSQL gathers planner statistics after a bulk load (autovacuum); the
      // throw-away bench cluster runs without autovacuum, so gather them as it would.
      if (engine === "postgres") await database.db.$executeRawUnsafe("ANALYZE");
      const label = `${engine}, ${report.flights} flights, ${report.levels} levels`;

      const runIds = (await database.db.analysisRun.findMany({ where: { isCurrent: true }, select: { id: true } })).map((r) => r.id);
      const t0 = performance.now();
      const reader = openLevelReader(database);
      let rows = 0;
      try {
        for (let i = 0; i < runIds.length; i += 100) rows += (await reader.read(runIds.slice(i, i + 100))).length;
      } finally {
        await reader.close();
      }
      const baselineSeconds = (performance.now() - t0) / 1000;
      results.push({ name: `baseline: read every level row (${label})`, value: baselineSeconds, unit: "s", note: `${rows} rows` });

      const oneFlight = await database.db.flight.findFirstOrThrow({ select: { id: true } });
      const idle = await runExportCommand(database.url, ["--source", "flight", "--flight", oneFlight.id]);
      results.push({ name: `baseline: peak RSS exporting one flight (${engine})`, value: idle.peakRssMb, unit: "MB", note: "the command with Node, its export worker, tsx, Prisma and the export code loaded" });

      for (const [what, args] of [
        ["data package, whole archive", []],
        ["levels CSV, whole archive", ["--format", "csv", "--table", "levels"]],
      ] as const) {
        const run = await runExportCommand(database.url, [...args]);
        results.push({
          name: `${what} (${label})`,
          value: run.exportSeconds,
          unit: "s",
          note: `target ≤ 10 s; ${run.outputMb.toFixed(0)} MB; ${(run.exportSeconds / baselineSeconds).toFixed(1)}× baseline; ${run.wallSeconds.toFixed(1)} s with process start`,
        });
        results.push({
          name: `${what}: peak RSS of the command (${engine})`,
          value: run.peakRssMb,
          unit: "MB",
          note: `target ≤ 300 MB; ${(run.peakRssMb - idle.peakRssMb).toFixed(0)} MB above the one-flight baseline`,
        });
      }
    } finally {
      await database.drop();
    }
  }
  return results;
}
