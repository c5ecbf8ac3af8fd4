/**
 * lib/cli/app-server.mjs, the server `npm start` runs: on PostgreSQL several app processes share
 * one port, every one answers, and a process that dies is replaced while the others keep serving.
 */
import { execFileSync, spawn, type ChildProcess } from "node:child_process";
import http from "node:http";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";
import { freeLoopbackPort } from "../support/free-port.ts";

const withPostgres = testEngines().includes("postgres");

function childPids(parent: number): number[] {
  try {
    return execFileSync("ps", ["-o", "pid=", "--ppid", String(parent)], { encoding: "utf8" })
      .split("\n")
      .map((line) => Number(line.trim()))
      .filter((pid) => pid > 0);
  } catch {
    return []; // ps exits 1 when there are none
  }
}

/** Status of a GET on a new connection each time (a kept-alive one may belong to the process that was killed). */
function statusOf(url: string, timeoutMs = 20_000): Promise<number> {
  return new Promise((resolve, reject) => {
    const request = http.get(url, { agent: false }, (response) => {
      response.resume();
      response.on("end", () => resolve(response.statusCode ?? 0));
    });
    request.on("error", reject);
    request.setTimeout(timeoutMs, () => request.destroy(new Error(`GET ${url} timed out`)));
  });
}

async function until<T>(what: string, probe: () => Promise<T | null> | T | null, seconds = 60): Promise<T> {
  const deadline = Date.now() + seconds * 1000;
  for (;;) {
    const value = await probe();
    if (value !== null) return value;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

describe.skipIf(!withPostgres)("app server with two app processes on PostgreSQL", () => {
  let database: TestDatabase;
  let server: ChildProcess;
  let base = "";
  let output = "";

  beforeAll(async () => {
    database = await createTestDatabase("postgres");
    const port = await freeLoopbackPort();
    base = `http://127.0.0.1:${port}`;
    server = spawn(process.execPath, [path.resolve("lib/cli/app-server.mjs")], {
      env: { ...process.env, DATABASE_URL: database.url, NODE_ENV: "production", PORT: String(port), HOST: "127.0.0.1", LAPSEBANK_APP_PROCESSES: "2" },
      stdio: ["ignore", "pipe", "pipe"],
    });
    server.stdout?.on("data", (c: Buffer) => (output = (output + c.toString()).slice(-5000)));
    server.stderr?.on("data", (c: Buffer) => (output = (output + c.toString()).slice(-5000)));
    await until("the app processes to listen", () => (output.includes("(2 app processes)") ? true : server.exitCode !== null ? Promise.reject(new Error(output)) : null), 90);
  }, 120_000);

  afterAll(async () => {
    if (server && server.exitCode === null) {
      server.kill("SIGTERM");
      await until("the server to stop", () => (server.exitCode !== null || server.signalCode !== null ? true : null), 15).catch(() => server.kill("SIGKILL"));
    }
    await database?.drop();
  });

  test("both processes answer, and one that dies is replaced while the other serves", async () => {
    const ok = () => statusOf(`${base}/api/v1/flights?pageSize=1`);
    for (let i = 0; i < 10; i++) expect(await ok()).toBe(200);
    const before = childPids(server.pid as number);
    expect(before).toHaveLength(2);

    process.kill(before[0] as number, "SIGKILL");
    // A connection the primary handed to the dying process may be lost, as with any crash; a client
    // (or the proxy) that retries gets an answer from the survivor while the replacement starts.
    await until("an answer after the kill", async () => ((await statusOf(`${base}/api/v1/flights?pageSize=1`, 3000).catch(() => 0)) === 200 ? true : null), 30);
    const after = await until("a replacement process", () => {
      const pids = childPids(server.pid as number);
      return pids.length === 2 && !pids.includes(before[0] as number) ? pids : null;
    });
    expect(after).toContain(before[1]);
    await until("the replacement to listen", () => (output.match(/starting another/g)?.length === 1 ? true : null));
    await until("both processes answering", async () => ((await statusOf(`${base}/api/v1/flights?pageSize=1`, 3000).catch(() => 0)) === 200 ? true : null), 30);
    for (let i = 0; i < 10; i++) expect(await ok()).toBe(200);
  }, 120_000);

  test("SIGTERM stops the primary and its processes", async () => {
    const children = childPids(server.pid as number);
    server.kill("SIGTERM");
    await until("the primary to exit", () => (server.exitCode !== null || server.signalCode !== null ? true : null), 15);
    await until("the app processes to exit", () => (children.every((pid) => { try { process.kill(pid, 0); return false; } catch { return true; } }) ? true : null), 15);
  }, 60_000);
});
