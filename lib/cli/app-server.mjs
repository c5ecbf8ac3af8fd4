/**
 * Serves the production build (.next) with one or more app processes on one port.
 *
 *   node lib/cli/app-server.mjs            (npm start runs it after migrations and the build)
 *
 * PORT (default 3000), LAPSEBANK_HOST or HOST (default: all interfaces; `npm start` passes 127.0.0.1
 * while the install has no accounts, see listen-host.ts), LAPSEBANK_APP_PROCESSES (default: one per
 * CPU core, at most 4, on PostgreSQL; always 1 on SQLite, whose single database file wants one
 * writer process). With more than one, node:cluster forks that many processes that share the
 * listening socket; each runs the Next.js request handler (the documented custom-server API), and
 * a process that dies is replaced. Nothing in Lapsebank keeps state in a process (sessions, rate
 * limits and audit live in the database), so any process may answer any request.
 * Plain JavaScript: the server processes need no TypeScript loader.
 */
import cluster from "node:cluster";
import http from "node:http";
import os from "node:os";
import { stampPeerAddress } from "./peer-address.mjs";

// Nothing leaves a school's server: Next.js telemetry is off in every process this starts.
process.env.NEXT_TELEMETRY_DISABLED = "1";

const port = Number(process.env.PORT ?? 3000);
const host = process.env.LAPSEBANK_HOST || process.env.HOST || undefined;

function processCount() {
  const url = process.env.DATABASE_URL ?? "file:./data/lapsebank.db";
  if (!/^postgres(ql)?:\/\//.test(url)) return 1;
  const requested = Number(process.env.LAPSEBANK_APP_PROCESSES);
  if (Number.isInteger(requested) && requested >= 1) return requested;
  return Math.max(1, Math.min(4, os.availableParallelism()));
}

async function serve() {
  const nextModule = await import("next");
  const createNext = typeof nextModule.default === "function" ? nextModule.default : nextModule.default.default;
  const app = createNext({ dev: false, dir: process.cwd(), hostname: host ?? "localhost", port });
  await app.prepare();
  const handle = app.getRequestHandler();
  const server = http.createServer((request, response) => {
    stampPeerAddress(request);
    return handle(request, response);
  });
  await new Promise((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, host, () => resolve(undefined));
  });
  const stop = () => server.close(() => process.exit(0));
  process.on("SIGTERM", stop);
  process.on("SIGINT", stop);
  return server;
}

const processes = processCount();
if (processes === 1) {
  await serve();
  console.log(`Lapsebank listening on http://${host ?? "localhost"}:${port} (1 app process)`);
} else if (cluster.isPrimary) {
  let stopping = false;
  let listening = 0;
  let restarts = [];
  cluster.on("listening", () => {
    if (++listening === processes) console.log(`Lapsebank listening on http://${host ?? "localhost"}:${port} (${processes} app processes)`);
  });
  cluster.on("exit", (worker, code, signal) => {
    if (stopping) {
      if (Object.keys(cluster.workers ?? {}).length === 0) process.exit(0);
      return;
    }
    console.error(`app process ${worker.process.pid} stopped (${signal ?? `code ${code}`}); starting another`);
    // A process that cannot start (port taken, no build) would die again at once: give up then.
    const now = Date.now();
    restarts = restarts.filter((at) => now - at < 10_000).concat(now);
    if (restarts.length > processes * 3) {
      console.error("app processes keep stopping; giving up");
      process.exit(1);
    }
    cluster.fork();
  });
  for (const signal of ["SIGTERM", "SIGINT"]) {
    process.on(signal, () => {
      stopping = true;
      for (const worker of Object.values(cluster.workers ?? {})) worker?.process.kill("SIGTERM");
      setTimeout(() => process.exit(0), 5000).unref();
    });
  }
  for (let i = 0; i < processes; i++) cluster.fork();
} else {
  await serve();
}
