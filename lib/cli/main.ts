import fs from "node:fs";
import path from "node:path";
import { parseArgs } from "node:util";
import { applyMigrations, redactUrl } from "../db/migrate.ts";
import { getEnv } from "../env.ts";
import type { ReprocessSelection } from "../ingest/index.ts";
import { EXPORT_HELP } from "./export-help.ts";
import { readUploadFile } from "./read-upload-file.ts";
import { isSetupCommand, SETUP_COMMANDS, SETUP_COMMANDS_HELP } from "./setup-help.ts";
import { z } from "zod";

// Each command loads only the modules it needs (the database client, ingest pipeline, demo
// generator, argon2 and the export code are large): start-up stays quick and an export's memory
// stays its own.
const exportCommands = () => import("./export-commands.ts");
let dbModule: typeof import("../db/index.ts") | undefined;
async function getDbHandle() {
  dbModule ??= await import("../db/index.ts");
  return dbModule.getDbHandle();
}

const HELP = `Lapsebank command line

Usage: npm run lapsebank -- <command> [options]

Commands:
  migrate                      apply the checked-in migrations to DATABASE_URL
  demo                         load the invented demo archive into an empty database (any engine)
  demo --yes                   wipe the database first, then load the demo archive
  demo remove                  delete exactly the demo flights and the demo setup nothing else uses
  reset [--yes]                delete every row of the database, leaving it empty (asks for --yes);
                               also the way out of an interrupted restore
${SETUP_COMMANDS_HELP}
  ingest <files...>            upload logger files through the same pipeline as the web
      --school ID --site ID --layout ID [--sensor ID] [--payload ID] [--calibration ID]
      [--launch ISO-8601] [--visibility school|program|public] [--lenient] [--title TEXT]
                               --launch needs its offset (2025-07-14T06:41:00-05:00 or ...T11:41:00Z);
                               it dates clock-time files and is checked against the file's clock
  reprocess (--all | --flight ID... | --calibration ID | --layout ID | --site ID) [--force]
                               re-analyse from the stored raw bytes as new runs (old runs are kept);
                               safe to interrupt and run again: up-to-date flights are skipped
  admin create --email E --name N
                               create a program admin (password from LAPSEBANK_ADMIN_PASSWORD or stdin)
${EXPORT_HELP}
  help                         this text

DATABASE_URL chooses the database: file:./data/lapsebank.db (default, SQLite) or postgres://...`;

/** Commands that read or write the archive: refused while an interrupted restore is unresolved. */
const SERVING_COMMANDS = new Set<string>(["demo", "ingest", "backup", "reprocess", "admin", ...SETUP_COMMANDS]);

async function main(argv: string[]): Promise<number> {
  const [command, ...rest] = argv;
  const url = getEnv().DATABASE_URL;
  if (command !== undefined && SERVING_COMMANDS.has(command)) {
    // `export` runs the same check in its worker (export-commands.ts).
    const { checkBeforeServing } = await import("./preflight.ts");
    const problem = await checkBeforeServing((await getDbHandle()).db);
    if (problem) {
      console.error(problem);
      return 1;
    }
  }
  if (isSetupCommand(command)) {
    const { runSetupCommand } = await import("./setup-commands.ts");
    return runSetupCommand((await getDbHandle()).db, command, rest);
  }
  switch (command) {
    case "migrate":
      applyMigrations(url);
      console.log(`Migrations applied to ${redactUrl(url)}`);
      return 0;
    case "demo":
      return runDemo(rest, url);
    case "reset":
      return runReset(rest, url);
    case "ingest":
      return runIngest(rest);
    case "export":
      // In a worker with a capped heap, so a large export's peak memory stays bounded (export-worker.mjs).
      return (await import("./export-worker.mjs")).runExportInWorker(rest);
    case "backup":
      return (await exportCommands()).runBackup(rest);
    case "restore":
      return (await exportCommands()).runRestore(rest);
    case "reprocess":
      return runReprocess(rest);
    case "admin":
      return runAdmin(rest);
    case undefined:
    case "help":
    case "--help":
      console.log(HELP);
      return 0;
    default:
      console.error(`Unknown command "${command}".\n\n${HELP}`);
      return 2;
  }
}

async function runDemo(args: string[], url: string): Promise<number> {
  const { values, positionals } = parseArgs({ args, allowPositionals: true, options: { yes: { type: "boolean", default: false } } });
  const [sub, ...extra] = positionals;
  if (sub === "remove" && extra.length === 0) return runDemoRemove();
  if (sub !== undefined) {
    console.error(`demo: unknown argument "${sub}" (use \`demo\`, \`demo --yes\` or \`demo remove\`)`);
    return 2;
  }
  const { db } = await getDbHandle();
  const existing = await db.flight.count();
  if (existing > 0 && !values.yes) {
    console.error(`The database ${redactUrl(url)} holds ${existing} flights. \`demo --yes\` deletes everything and loads the demo archive; \`demo remove\` deletes only the demo.`);
    return 1;
  }
  const [{ resetDatabase }, { loadDemoProgram }] = await Promise.all([import("./reset.ts"), import("../../seed/load.ts")]);
  await resetDatabase(db);
  const started = Date.now();
  const report = await loadDemoProgram(db, {
    onProgress: (done, total, fileName) => process.stdout.write(`\rLoading demo flights ${done}/${total} ${fileName.padEnd(40)}`),
  });
  process.stdout.write("\n");
  console.log(`Demo archive (invented, labelled as such): ${report.schools} schools, ${report.sites} sites, ${report.flights} flights in ${((Date.now() - started) / 1000).toFixed(1)} s`);
  for (const f of report.failures) console.error(`  failed ${f.fileName}: ${f.message}`);
  return report.failures.length ? 1 : 0;
}

/** `demo remove`: the same lib function as the program admin's button on the Setup page. */
async function runDemoRemove(): Promise<number> {
  const { db } = await getDbHandle();
  const [{ removeDemoProgram }, { LOCAL_VIEWER }] = await Promise.all([import("../ingest/demo-data.ts"), import("../auth/visibility.ts")]);
  const report = await removeDemoProgram(db, LOCAL_VIEWER, { userId: null, label: "cli" });
  console.log(`Demo removed: ${report.flights} flights, ${report.schools} schools, ${report.sites} sites, ${report.payloads} payloads, ${report.sensors} sensors, ${report.calibrations} calibrations, ${report.layouts} layouts`);
  for (const k of report.kept) console.log(`  kept ${k.kind} ${k.name}: ${k.reason}`);
  return 0;
}

async function runReset(args: string[], url: string): Promise<number> {
  const { values } = parseArgs({ args, options: { yes: { type: "boolean", default: false } } });
  const { db } = await getDbHandle();
  if (!values.yes) {
    const [flights, markers] = await Promise.all([db.flight.count(), db.restoreMarker.count()]);
    console.error(`\`reset --yes\` deletes every row of ${redactUrl(url)} (${flights} flights${markers ? ", and the mark of an interrupted restore" : ""}), leaving an empty database for \`restore\` or \`npm start\`.`);
    return 1;
  }
  const { resetDatabase } = await import("./reset.ts");
  await resetDatabase(db);
  console.log(`${redactUrl(url)} is empty.`);
  return 0;
}

async function runIngest(args: string[]): Promise<number> {
  const { values, positionals } = parseArgs({
    args,
    allowPositionals: true,
    options: {
      school: { type: "string" }, site: { type: "string" }, layout: { type: "string" }, sensor: { type: "string" },
      payload: { type: "string" }, calibration: { type: "string" }, launch: { type: "string" },
      visibility: { type: "string", default: "program" }, lenient: { type: "boolean", default: false }, title: { type: "string" },
      server: { type: "string" }, token: { type: "string" },
    },
  });
  if (values.server) return runRemoteIngest(positionals, values);
  if (positionals.length === 0) {
    console.error("ingest: name at least one file");
    return 2;
  }
  const { db } = await getDbHandle();
  const { formatIssue, ingestFlightFile, IngestFailure } = await import("../ingest/index.ts");
  let failed = 0;
  for (const [index, file] of positionals.entries()) {
    const label = `[${index + 1}/${positionals.length}] ${file}`;
    let bytes: Uint8Array;
    try {
      bytes = readUploadFile(file, getEnv().LAPSEBANK_MAX_UPLOAD_MB * 1048576);
    } catch (error) {
      console.error(`${label}: cannot read: ${(error as Error).message}`);
      failed++;
      continue;
    }
    try {
      const result = await ingestFlightFile(db, {
        file: { name: path.basename(file), bytes },
        metadata: {
          schoolId: values.school, siteId: values.site, layoutId: values.layout, sensorId: values.sensor,
          payloadId: values.payload, calibrationId: values.calibration, launchAtUtc: values.launch,
          visibility: values.visibility, mode: values.lenient ? "lenient" : "strict", title: values.title,
        },
        actor: { userId: null, label: "cli" },
      });
      const tropopause = result.tropopauseAltitudeM === null ? "not found" : `${(result.tropopauseAltitudeM / 1000).toFixed(2)} km`;
      const lapse = result.troposphericLapseRateKPerKm === null ? "n/a" : `${result.troposphericLapseRateKPerKm.toFixed(2)} K/km`;
      console.log(`${label}: flight ${result.flightId}, launch ${result.launchAtUtc.toISOString()}, tropopause ${tropopause}, lapse rate ${lapse}${result.warnings.length ? `, ${result.warnings.length} warning(s)` : ""}`);
      for (const warning of result.warnings) console.log(`  warning (${warning.code}): ${warning.message}`);
    } catch (error) {
      failed++;
      if (error instanceof IngestFailure) {
        console.error(`${label}: refused (${error.code})`);
        for (const issue of error.issues) console.error(`  ${formatIssue(issue)}`);
      } else {
        console.error(`${label}: ${(error as Error).message}`);
      }
    }
  }
  console.log(`${positionals.length - failed} ingested, ${failed} failed`);
  return failed ? 1 : 0;
}

/** `ingest --server URL --token T`: the same upload through a remote server's JSON API. */
async function runRemoteIngest(files: string[], values: Record<string, string | boolean | undefined>): Promise<number> {
  const server = String(values.server).replace(/\/+$/, "");
  const token = values.token ?? getEnv().LAPSEBANK_TOKEN;
  if (!token) {
    console.error("ingest --server needs --token (or LAPSEBANK_TOKEN): make one on the server's Account page");
    return 2;
  }
  const fields: Record<string, string | undefined> = {
    schoolId: values.school as string | undefined, siteId: values.site as string | undefined, layoutId: values.layout as string | undefined,
    sensorId: values.sensor as string | undefined, payloadId: values.payload as string | undefined, calibrationId: values.calibration as string | undefined,
    launchAtUtc: values.launch as string | undefined, visibility: values.visibility as string | undefined, mode: values.lenient ? "lenient" : "strict",
    title: values.title as string | undefined,
  };
  let failed = 0;
  for (const [index, file] of files.entries()) {
    const label = `[${index + 1}/${files.length}] ${file}`;
    const form = new FormData();
    // Fields first: the server checks the school before it reads the file.
    for (const [key, value] of Object.entries(fields)) if (value) form.set(key, value);
    try {
      form.set("file", new Blob([readUploadFile(file, getEnv().LAPSEBANK_MAX_UPLOAD_MB * 1048576)]), path.basename(file));
    } catch (error) {
      console.error(`${label}: cannot read: ${(error as Error).message}`);
      failed++;
      continue;
    }
    try {
      const response = await fetch(`${server}/api/v1/flights`, { method: "POST", body: form, headers: { Authorization: `Bearer ${token}` } });
      const body = (await response.json().catch(() => ({}))) as { flight?: { id: string; url: string }; error?: { code: string; message: string; issues?: Array<{ file: string; line: number | null; column: number | null; message: string }> } };
      if (response.status === 201 && body.flight) {
        console.log(`${label}: flight ${body.flight.id} (${body.flight.url})`);
      } else {
        failed++;
        console.error(`${label}: refused with HTTP ${response.status} (${body.error?.code ?? "?"}): ${body.error?.message ?? ""}`);
        for (const issue of body.error?.issues ?? []) console.error(`  ${issue.file}${issue.line ? `, line ${issue.line}` : ""}${issue.column ? `, column ${issue.column}` : ""}: ${issue.message}`);
      }
    } catch (error) {
      failed++;
      console.error(`${label}: could not reach ${server}: ${(error as Error).message}`);
    }
  }
  console.log(`${files.length - failed} ingested, ${failed} failed`);
  return failed ? 1 : 0;
}

async function runAdmin(args: string[]): Promise<number> {
  const [sub, ...rest] = args;
  if (sub !== "create") {
    console.error("usage: admin create --email E --name N (password from LAPSEBANK_ADMIN_PASSWORD or the first line of stdin)");
    return 2;
  }
  const { values } = parseArgs({ args: rest, options: { email: { type: "string" }, name: { type: "string" } } });
  let password = getEnv().LAPSEBANK_ADMIN_PASSWORD;
  if (!password) {
    process.stderr.write("Password (at least 10 characters): ");
    password = await readLine();
  }
  const { db } = await getDbHandle();
  try {
    const { createUser } = await import("../auth/accounts.ts");
    const user = await createUser(db, { email: values.email ?? "", displayName: values.name ?? "", password: password ?? "" }, { programAdmin: true });
    console.log(`Program admin ${user.email} created.`);
    return 0;
  } catch (error) {
    const message = error instanceof z.ZodError ? error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("; ") : (error as Error).message;
    console.error(`admin create: ${message}`);
    return 1;
  }
}

function readLine(): Promise<string> {
  return new Promise((resolve) => {
    let buffer = "";
    process.stdin.setEncoding("utf8");
    process.stdin.on("data", (chunk) => {
      buffer += chunk;
      if (buffer.includes("\n")) {
        process.stdin.pause();
        resolve(buffer.split("\n")[0]?.trim() ?? "");
      }
    });
    process.stdin.on("end", () => resolve(buffer.trim()));
  });
}

async function runReprocess(args: string[]): Promise<number> {
  const { values } = parseArgs({
    args,
    options: {
      all: { type: "boolean", default: false }, flight: { type: "string", multiple: true },
      calibration: { type: "string" }, layout: { type: "string" }, site: { type: "string" }, force: { type: "boolean", default: false },
    },
  });
  const chosen = [values.all, values.flight?.length, values.calibration, values.layout, values.site].filter(Boolean).length;
  if (chosen !== 1) {
    console.error("reprocess: give exactly one of --all, --flight ID (repeatable), --calibration ID, --layout ID, --site ID");
    return 2;
  }
  const selection: ReprocessSelection = values.all
    ? { all: true }
    : values.flight?.length
      ? { flightIds: values.flight }
      : values.calibration
        ? { calibrationId: values.calibration }
        : values.site
          ? { siteId: values.site }
          : { layoutId: values.layout as string };
  const controller = new AbortController();
  process.once("SIGINT", () => {
    console.error("\nInterrupted: finishing the current flight; run the same command again to resume.");
    controller.abort();
  });
  const { db } = await getDbHandle();
  const { reprocessFlights } = await import("../ingest/index.ts");
  const result = await reprocessFlights(db, selection, {
    reason: "cli reprocess", force: values.force, actor: { userId: null, label: "cli" }, signal: controller.signal,
    onProgress: (done, total, outcome) => {
      const change = outcome.change;
      const detail = outcome.status === "failed" ? outcome.message
        : change ? [
            change.tropopauseAltitudeDeltaM !== null ? `tropopause ${change.tropopauseAltitudeDeltaM >= 0 ? "+" : ""}${change.tropopauseAltitudeDeltaM.toFixed(0)} m` : null,
            change.troposphericLapseRateDeltaKPerKm !== null ? `lapse rate ${change.troposphericLapseRateDeltaKPerKm >= 0 ? "+" : ""}${change.troposphericLapseRateDeltaKPerKm.toFixed(2)} K/km` : null,
          ].filter(Boolean).join(", ")
        : "";
      console.log(`[${done}/${total}] ${outcome.flightId}: ${outcome.status}${detail ? ` (${detail})` : ""}`);
    },
  });
  const count = (status: string) => result.outcomes.filter((o) => o.status === status).length;
  console.log(`${result.total} selected: ${count("reprocessed")} reprocessed, ${count("up-to-date")} already up to date, ${count("failed")} failed${result.interrupted ? `, ${result.total - result.outcomes.length} not reached (interrupted)` : ""}`);
  for (const o of result.outcomes.filter((x) => x.status === "failed")) console.error(`  ${o.flightId} stays on its previous run: ${o.message}`);
  return count("failed") || result.interrupted ? 1 : 0;
}

main(process.argv.slice(2)).then(
  async (code) => {
    await dbModule?.getDbHandle().db.$disconnect().catch(() => undefined);
    process.exit(code);
  },
  (error) => {
    console.error(error instanceof Error ? error.message : error);
    process.exit(1);
  },
);
