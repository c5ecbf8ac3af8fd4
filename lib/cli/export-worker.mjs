/**
 * The CLI export, run in a worker thread with a capped V8 heap.
 *
 * Why: with Node's default limit V8 lets the heap fill with garbage before a full collection (a
 * whole-archive export reached 140 MB of heap with 35 MB live). A cap makes V8 collect sooner, so
 * the command's peak memory follows what the export holds, which the streaming keeps small
 * whatever the archive's size. LAPSEBANK_EXPORT_HEAP_MB raises the cap should an export need more.
 *
 * Plain JavaScript, one file in two roles: imported on the main thread it exports the runner
 * (launch.mjs starts it without loading the TypeScript loader on that thread); run as the worker
 * it registers tsx itself (a worker does not inherit the parent's loader on Node 20), runs
 * `runExport` of export-commands.ts and closes the database connections.
 */
import { setFlagsFromString } from "node:v8";
import { isMainThread, Worker, workerData } from "node:worker_threads";

const HEAP_ENV = "LAPSEBANK_EXPORT_HEAP_MB";
const DEFAULT_OLD_HEAP_MB = 96;
/** New objects; more than the default trades a little memory for fewer scavenges (measured faster). */
const YOUNG_HEAP_MB = 16;

/** The old-generation cap in MB from the environment, or an error message. */
function oldHeapMb(env) {
  const text = env[HEAP_ENV];
  if (text === undefined || text === "") return DEFAULT_OLD_HEAP_MB;
  const mb = Number(text);
  if (!Number.isInteger(mb) || mb < 32) return `${HEAP_ENV} must be a whole number of megabytes, at least 32 (got "${text}")`;
  return mb;
}

/** Runs `export <args>` in a heap-capped worker; resolves to the command's exit code. */
export function runExportInWorker(args) {
  const oldMb = oldHeapMb(process.env);
  if (typeof oldMb === "string") {
    console.error(`export: ${oldMb}`);
    return Promise.resolve(2);
  }
  return new Promise((resolve) => {
    let failed = false;
    const worker = new Worker(new URL(import.meta.url), {
      workerData: { role: "lapsebank-export", args },
      // The worker registers tsx itself; inheriting --import would load it twice.
      execArgv: [],
      resourceLimits: { maxOldGenerationSizeMb: oldMb, maxYoungGenerationSizeMb: YOUNG_HEAP_MB },
    });
    worker.on("error", (error) => {
      failed = true;
      if (error.code === "ERR_WORKER_OUT_OF_MEMORY") {
        console.error(`export: ran out of its ${oldMb} MB heap; set ${HEAP_ENV} to more megabytes and run it again`);
      } else {
        console.error(error instanceof Error ? error.message : error);
      }
    });
    worker.on("exit", (code) => resolve(failed ? 1 : code));
  });
}

if (!isMainThread && workerData?.role === "lapsebank-export") {
  // Prisma's query compiler is a 3 MB WebAssembly module. V8 compiles it twice: at once with its
  // baseline compiler (Liftoff), then again in the background with its optimising one, which
  // held about 70 MB while the export ran. The baseline code is fast enough for the few queries
  // an export plans, so the second compile is turned off (a compile-time flag: set before Prisma loads).
  setFlagsFromString("--liftoff-only");
  // A NetCDF export writes with h5wasm, whose 4 MB generated module took more than the capped heap
  // when it passed through tsx's loader (measured: over 96 MB, under 128). Loaded here first, by
  // Node's own loader, it costs about 14 MB; the export's later import finds it in the module cache.
  const args = workerData.args;
  if (args.some((a, i) => a === "--format=netcdf" || (a === "--format" && args[i + 1] === "netcdf"))) await import("h5wasm/node");
  const { register } = await import("tsx/esm/api");
  register();
  const [{ runExport }, { getDbHandle }] = await Promise.all([import("./export-commands.ts"), import("../db/index.ts")]);
  const code = await runExport(workerData.args);
  await getDbHandle().db.$disconnect().catch(() => undefined);
  process.exit(code);
}
