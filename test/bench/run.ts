/**
 * `npm run bench`: every benchmark, printed as a table. Figures are ratios against baselines measured
 * in the same run, so they mean something on a busy or slow machine. Not part of `npm test` or CI.
 * PostgreSQL: uses LAPSEBANK_TEST_POSTGRES_URL, else starts the throw-away cluster of the tests.
 */
import { execFileSync } from "node:child_process";
import type { BenchResult } from "./types.ts";
import type { Engine } from "../support/test-databases.ts";

async function main() {
  let stopPostgres: (() => void) | null = null;
  if (!process.env.LAPSEBANK_TEST_POSTGRES_URL && process.env.LAPSEBANK_SKIP_POSTGRES !== "1") {
    const url = execFileSync("bash", ["test/support/postgres.sh", "start", "/tmp/lapsebank-bench-pg", "5440"], { encoding: "utf8" }).trim().split("\n").pop() ?? "";
    process.env.LAPSEBANK_TEST_POSTGRES_URL = url.replace(/\/lapsebank$/, "/postgres");
    stopPostgres = () => execFileSync("bash", ["test/support/postgres.sh", "stop", "/tmp/lapsebank-bench-pg"]);
  }
  const engines: Engine[] = process.env.LAPSEBANK_TEST_POSTGRES_URL ? ["sqlite", "postgres"] : ["sqlite"];
  const only = process.argv.slice(2);
  const suites: Array<[string, () => Promise<BenchResult[]>]> = [
    ["analysis", async () => (await import("./analysis.bench.ts")).benchAnalysis()],
    ["ingest", async () => (await import("./ingest.bench.ts")).benchIngest(engines)],
  ];
  for (const [name, path] of [["climatology", "./climatology.bench.ts"], ["export", "./export.bench.ts"], ["load", "./load.bench.ts"], ["upload-memory", "./upload-memory.bench.ts"], ["scale", "./scale.bench.ts"]] as const) {
    suites.push([name, async () => {
      const mod = (await import(path)) as Record<string, (engines: Engine[]) => Promise<BenchResult[]>>;
      const fn = Object.values(mod).find((v) => typeof v === "function");
      return fn ? fn(engines) : [];
    }]);
  }
  try {
    for (const [name, run] of suites) {
      if (only.length && !only.includes(name)) continue;
      let results: BenchResult[];
      try {
        results = await run();
      } catch (error) {
        if ((error as NodeJS.ErrnoException).code === "ERR_MODULE_NOT_FOUND" || /Cannot find module/.test(String(error))) continue;
        throw error;
      }
      console.log(`\n## ${name}`);
      for (const r of results) console.log(`${r.name.padEnd(70)} ${r.value.toFixed(r.value < 10 ? 2 : 0).padStart(10)} ${r.unit.padEnd(10)} ${r.note ?? ""}`);
    }
    console.log(`\npeak RSS of the bench process: ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`);
  } finally {
    stopPostgres?.();
  }
}

main().then(() => process.exit(0), (error) => {
  console.error(error);
  process.exit(1);
});
