import { spawn, spawnSync } from "node:child_process";
import fs from "node:fs";
import { getDbHandle } from "../db/index.ts";
import { applyMigrations, redactUrl } from "../db/migrate.ts";
import { getEnv } from "../env.ts";
import { loadDemoProgram } from "../../seed/load.ts";
import { checkBeforeServing } from "./preflight.ts";

/**
 * `npm start`: apply migrations, refuse a database an interrupted restore left, load the demo archive
 * when the database is empty, build the app when there is no production build yet, then serve it on
 * PORT (default 3000).
 */
async function start(): Promise<void> {
  // Nothing leaves a school's server: the build and the app processes inherit this.
  process.env.NEXT_TELEMETRY_DISABLED = "1";
  const env = getEnv();
  console.log(`Database: ${redactUrl(env.DATABASE_URL)}`);
  applyMigrations(env.DATABASE_URL);
  const { db } = getDbHandle();
  const problem = await checkBeforeServing(db);
  if (problem) {
    console.error(problem);
    await db.$disconnect();
    process.exit(1);
  }
  if ((await db.school.count()) === 0 && process.env.LAPSEBANK_SKIP_DEMO !== "1") {
    console.log("The database is empty: loading the demo archive (invented schools and flights)…");
    const report = await loadDemoProgram(db, {
      onProgress: (done, total) => process.stdout.write(`\r  ${done}/${total} flights`),
    });
    process.stdout.write("\n");
    console.log(`  ${report.flights} demo flights loaded${report.failures.length ? `, ${report.failures.length} failed` : ""}`);
  }
  await db.$disconnect();

  if (buildIsStale() || process.env.LAPSEBANK_REBUILD === "1") {
    console.log("Building the web app (first start, or the sources changed since the last build)…");
    const build = spawnSync("node_modules/.bin/next", ["build"], { stdio: "inherit" });
    if (build.status !== 0) process.exit(build.status ?? 1);
  }
  console.log(`Serving Lapsebank on http://localhost:${env.PORT}`);
  // A plain Node process of its own (no TypeScript loader, none of this process's memory); on
  // PostgreSQL it runs one app process per core (lib/cli/app-server.mjs).
  const server = spawn(process.execPath, ["lib/cli/app-server.mjs"], { stdio: "inherit", env: { ...process.env, PORT: String(env.PORT) } });
  for (const signal of ["SIGINT", "SIGTERM"] as const) process.on(signal, () => server.kill(signal));
  server.on("exit", (code) => process.exit(code ?? 0));
}

/** True when there is no production build or a source file is newer than it. */
function buildIsStale(): boolean {
  const buildId = ".next/BUILD_ID";
  if (!fs.existsSync(buildId)) return true;
  const builtAt = fs.statSync(buildId).mtimeMs;
  const newest = (entry: string): number => {
    if (!fs.existsSync(entry)) return 0;
    const stat = fs.statSync(entry);
    if (!stat.isDirectory()) return stat.mtimeMs;
    let latest = 0;
    for (const name of fs.readdirSync(entry)) {
      if (name === "generated" || name === "node_modules") continue;
      latest = Math.max(latest, newest(`${entry}/${name}`));
    }
    return latest;
  };
  return Math.max(...["app", "lib", "next.config.js", "package-lock.json", "prisma/schema.prisma"].map(newest)) > builtAt;
}

start().catch((error) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
