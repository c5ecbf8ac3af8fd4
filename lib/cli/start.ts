import { spawn, spawnSync } from "node:child_process";
import fs from "node:fs";
import { getDbHandle } from "../db/index.ts";
import { applyMigrations, redactUrl } from "../db/migrate.ts";
import { getEnv } from "../env.ts";
import { chooseListenHost } from "./listen-host.ts";
import { autoloadDemo } from "../../seed/load.ts";
import { checkBeforeServing } from "./preflight.ts";

/**
 * `npm start`: apply migrations, refuse a database an interrupted restore left, load the demo archive
 * when an embedded SQLite database is empty (never on PostgreSQL, never beside other data), build the
 * app when there is no production build yet, then serve it on PORT (default 3000).
 */
async function start(): Promise<void> {
  // Nothing leaves a school's server: the build and the app processes inherit this.
  process.env.NEXT_TELEMETRY_DISABLED = "1";
  const env = getEnv();
  console.log(`Database: ${redactUrl(env.DATABASE_URL)}`);
  applyMigrations(env.DATABASE_URL);
  const handle = getDbHandle();
  const { db } = handle;
  const problem = await checkBeforeServing(db);
  if (problem) {
    console.error(problem);
    await db.$disconnect();
    process.exit(1);
  }
  const demo = await autoloadDemo(handle, {
    skip: env.LAPSEBANK_SKIP_DEMO,
    onProgress: (done, total) => {
      if (done === 1) console.log("The SQLite database is empty: loading the demo archive (invented schools and flights, labelled as such)…");
      process.stdout.write(`\r  ${done}/${total} flights`);
    },
  });
  if (demo.loaded) {
    process.stdout.write("\n");
    console.log(`  ${demo.report.flights} demo flights loaded${demo.report.failures.length ? `, ${demo.report.failures.length} failed` : ""}; \`npm run lapsebank -- demo remove\` takes them out again`);
  } else if (demo.reason === "not-sqlite" && (await db.flight.count()) === 0) {
    console.log("PostgreSQL database: no demo loaded (run `npm run lapsebank -- demo` to load the invented demo archive)");
  }
  const listen = chooseListenHost({ lapsebankHost: env.LAPSEBANK_HOST, host: env.HOST, accountsExist: (await db.user.count()) > 0 });
  await db.$disconnect();

  if (buildIsStale() || env.LAPSEBANK_REBUILD) {
    console.log("Building the web app (first start, or the sources changed since the last build)…");
    const build = spawnSync("node_modules/.bin/next", ["build"], { stdio: "inherit" });
    if (build.status !== 0) process.exit(build.status ?? 1);
  }
  console.log(`Serving Lapsebank on http://${listen.host ?? "localhost"}:${env.PORT} (${listen.why})`);
  // A plain Node process of its own (no TypeScript loader, none of this process's memory); on
  // PostgreSQL it runs one app process per core (lib/cli/app-server.mjs).
  const serverEnv: NodeJS.ProcessEnv = { ...process.env, PORT: String(env.PORT) };
  delete serverEnv.HOST;
  if (listen.host) serverEnv.LAPSEBANK_HOST = listen.host;
  else delete serverEnv.LAPSEBANK_HOST;
  const server = spawn(process.execPath, ["lib/cli/app-server.mjs"], { stdio: "inherit", env: serverEnv });
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
