import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import type { TestProject } from "vitest/node";
import { freeLoopbackPort } from "./free-port.ts";

declare module "vitest" {
  export interface ProvidedContext {
    /** Where the e2e tests find the app, e.g. http://127.0.0.1:41234 (loopback only). */
    e2eBaseUrl: string;
  }
}

const SERVER_START_LIMIT_MS = 60_000;
const OUTPUT_KEEP_CHARS = 20_000;

/**
 * Global set-up of the "e2e" vitest project: a fresh SQLite database in a temp folder, the
 * checked-in migrations, the demo archive, a production build (skipped when
 * LAPSEBANK_E2E_SKIP_BUILD=1 and .next/BUILD_ID exists), and `next start` on a free loopback
 * port. The base URL reaches tests through `inject("e2eBaseUrl")`. Teardown stops the server
 * and removes the temp folder.
 *
 * LAPSEBANK_E2E_BASE_URL=http://127.0.0.1:<port> skips all of this and tests an app that is
 * already running (it must be on loopback and hold the demo archive).
 */
export default async function setup(project: TestProject): Promise<() => Promise<void>> {
  const external = process.env.LAPSEBANK_E2E_BASE_URL;
  if (external) {
    project.provide("e2eBaseUrl", loopbackOnly(external));
    return async () => undefined;
  }

  const root = process.cwd();
  const tempDir = fs.mkdtempSync(path.join(os.tmpdir(), "lapsebank-e2e-"));
  const databaseUrl = `file:${path.join(tempDir, "e2e.db")}`;
  const env: NodeJS.ProcessEnv = { ...process.env, DATABASE_URL: databaseUrl, NODE_ENV: "production", NEXT_TELEMETRY_DISABLED: "1" };
  let server: ChildProcess | undefined;

  const teardown = async () => {
    if (server) await stopProcessGroup(server);
    fs.rmSync(tempDir, { recursive: true, force: true });
  };

  try {
    step("applying migrations to a fresh SQLite database");
    run(root, "node_modules/.bin/prisma", ["migrate", "deploy"], env);
    step("loading the demo archive");
    run(root, "node_modules/.bin/tsx", ["lib/cli/main.ts", "demo", "--yes"], env);

    const haveBuild = fs.existsSync(path.join(root, ".next", "BUILD_ID"));
    if (process.env.LAPSEBANK_E2E_SKIP_BUILD === "1" && haveBuild) {
      step("LAPSEBANK_E2E_SKIP_BUILD=1: using the existing production build");
    } else {
      step("building the app (next build)");
      run(root, "node_modules/.bin/next", ["build"], env);
    }

    const port = await freeLoopbackPort();
    const baseUrl = `http://127.0.0.1:${port}`;
    step(`starting next on ${baseUrl}`);
    const output = { text: "" };
    server = spawn(path.join(root, "node_modules/.bin/next"), ["start", "-H", "127.0.0.1", "-p", String(port)], {
      cwd: root,
      env: { ...env, PORT: String(port) },
      stdio: ["ignore", "pipe", "pipe"],
      // Own process group, so teardown can stop next and any worker it forks, and nothing else.
      detached: true,
    });
    const keep = (chunk: Buffer) => {
      output.text = (output.text + chunk.toString("utf8")).slice(-OUTPUT_KEEP_CHARS);
    };
    server.stdout?.on("data", keep);
    server.stderr?.on("data", keep);
    await waitUntilAnswering(baseUrl, server, output);
    step("app is up");
    project.provide("e2eBaseUrl", baseUrl);
    return teardown;
  } catch (error) {
    await teardown();
    throw error;
  }
}

function step(message: string): void {
  process.stdout.write(`[e2e set-up] ${message}\n`);
}

function run(cwd: string, command: string, args: string[], env: NodeJS.ProcessEnv): void {
  const result = spawnSync(path.join(cwd, command), args, { cwd, env, encoding: "utf8", maxBuffer: 64 * 1024 * 1024 });
  if (result.status !== 0) {
    const why = result.error ? result.error.message : `exit code ${String(result.status)}${result.signal ? `, signal ${result.signal}` : ""}`;
    throw new Error(`e2e set-up: \`${command} ${args.join(" ")}\` failed (${why})\n--- stdout ---\n${tail(result.stdout)}\n--- stderr ---\n${tail(result.stderr)}`);
  }
}

function tail(text: string | null | undefined): string {
  return (text ?? "").slice(-OUTPUT_KEEP_CHARS);
}

function loopbackOnly(url: string): string {
  const parsed = new URL(url);
  if (!["127.0.0.1", "localhost", "[::1]"].includes(parsed.hostname)) {
    throw new Error(`LAPSEBANK_E2E_BASE_URL must point at this machine (127.0.0.1 or localhost), not ${parsed.hostname}`);
  }
  return parsed.origin;
}


async function waitUntilAnswering(baseUrl: string, server: ChildProcess, output: { text: string }): Promise<void> {
  const deadline = Date.now() + SERVER_START_LIMIT_MS;
  let lastProblem = "no answer yet";
  while (Date.now() < deadline) {
    if (server.exitCode !== null || server.signalCode !== null) {
      throw new Error(`e2e set-up: next start exited early (code ${String(server.exitCode)}, signal ${String(server.signalCode)})\n--- server output ---\n${output.text}`);
    }
    try {
      const response = await fetch(baseUrl, { signal: AbortSignal.timeout(5_000) });
      await response.arrayBuffer();
      if (response.status < 500) return;
      lastProblem = `HTTP ${response.status}`;
    } catch (error) {
      lastProblem = error instanceof Error ? error.message : String(error);
    }
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
  throw new Error(`e2e set-up: the app did not answer at ${baseUrl} within ${SERVER_START_LIMIT_MS / 1000} s (last: ${lastProblem})\n--- server output ---\n${output.text}`);
}

async function stopProcessGroup(child: ChildProcess): Promise<void> {
  if (child.pid === undefined || child.exitCode !== null || child.signalCode !== null) return;
  const exited = new Promise<void>((resolve) => child.once("exit", () => resolve()));
  signalGroup(child.pid, "SIGTERM");
  const timedOut = await Promise.race([exited.then(() => false), new Promise<boolean>((resolve) => setTimeout(() => resolve(true), 10_000))]);
  if (timedOut) {
    signalGroup(child.pid, "SIGKILL");
    await exited;
  }
}

function signalGroup(pid: number, signal: NodeJS.Signals): void {
  try {
    process.kill(-pid, signal);
  } catch {
    // The group is already gone.
  }
}
