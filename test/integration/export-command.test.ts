/**
 * The export command as users run it (`npm run lapsebank -- export`, i.e. lib/cli/launch.mjs): it
 * runs in a heap-capped worker thread, writes the same bytes as the in-process export, reports
 * errors with the right exit code and never leaves a partial file under the requested name.
 */
import { spawn } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { unzipSync } from "fflate";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { ingestFlightFile } from "../../lib/ingest/index.ts";
import { createExport } from "../../lib/export/export.ts";
import { LOCAL_VIEWER } from "../../lib/auth/visibility.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";
import { lapsebankNodeArgs } from "../support/lapsebank-command.ts";

interface CommandResult {
  code: number | null;
  stdout: string;
  stderr: string;
}

function runCommand(databaseUrl: string, args: string[], env: Record<string, string> = {}): Promise<CommandResult> {
  const child = spawn(process.execPath, [...lapsebankNodeArgs(), ...args], { env: { ...process.env, DATABASE_URL: databaseUrl, ...env }, stdio: ["ignore", "pipe", "pipe"] });
  let stdout = "";
  let stderr = "";
  child.stdout.on("data", (chunk) => (stdout += chunk));
  child.stderr.on("data", (chunk) => (stderr += chunk));
  return new Promise((resolve) => child.on("exit", (code) => resolve({ code, stdout, stderr })));
}

async function collect(body: AsyncIterable<Uint8Array>): Promise<Buffer> {
  const parts: Uint8Array[] = [];
  for await (const chunk of body) parts.push(chunk);
  return Buffer.concat(parts);
}

describe.each(testEngines())("export command on %s", (engine) => {
  let database: TestDatabase;
  let dir: string;
  const flightIds: string[] = [];

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    dir = fs.mkdtempSync(path.join(os.tmpdir(), "lapsebank-export-command-"));
    const ids = await setUpSchool(database.db, "Command Line School");
    for (const seed of [41, 42]) {
      const f = makeFlightFile({ seed });
      const result = await ingestFlightFile(database.db, {
        file: { name: `flight-${seed}.csv`, bytes: f.bytes },
        metadata: { schoolId: ids.school.id, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc: f.launchAtUtc.toISOString() },
      });
      flightIds.push(result.flightId);
    }
  }, 120_000);

  afterAll(async () => {
    await database?.drop();
    if (dir) fs.rmSync(dir, { recursive: true, force: true });
  });

  test("writes a data package of every flight and reports it", async () => {
    const out = path.join(dir, "archive.zip");
    const result = await runCommand(database.url, ["export", "--out", out]);
    expect(result.stderr).toBe("");
    expect(result.code).toBe(0);
    expect(result.stdout).toMatch(/^Wrote .*archive\.zip \(2 flights, [\d.]+ MB\) in [\d.]+ s\n$/);
    const entries = unzipSync(new Uint8Array(fs.readFileSync(out)));
    expect(Object.keys(entries)).toEqual(expect.arrayContaining(["data/levels.csv", "data/flights.csv", "data/runs.csv", "datapackage.json", "CITATION.cff", "README.md"]));
    const flightsCsv = new TextDecoder().decode(entries["data/flights.csv"]);
    for (const id of flightIds) expect(flightsCsv).toContain(id);
    expect(fs.existsSync(`${out}.part`)).toBe(false);
  }, 60_000);

  test("the levels CSV is byte for byte the in-process export's", async () => {
    const out = path.join(dir, "levels.csv");
    const result = await runCommand(database.url, ["export", "--format", "csv", "--table", "levels", "--out", out]);
    expect(result.code).toBe(0);
    const expected = await collect((await createExport(database, LOCAL_VIEWER, { format: "csv", table: "levels" })).body);
    expect(expected.length).toBeGreaterThan(10_000);
    expect(fs.readFileSync(out).equals(expected)).toBe(true);
  }, 60_000);

  test("an unknown flight exits 1 with a message and leaves no file", async () => {
    const out = path.join(dir, "missing.zip");
    const result = await runCommand(database.url, ["export", "--source", "flight", "--flight", "no-such-flight", "--out", out]);
    expect(result.code).toBe(1);
    expect(result.stderr).toContain("export: Flight not found, or not visible to you");
    expect(fs.existsSync(out) || fs.existsSync(`${out}.part`)).toBe(false);
  }, 60_000);

  test("bad parameters exit 2; a heap cap that is not a number is refused before anything runs", async () => {
    const badFormat = await runCommand(database.url, ["export", "--format", "xml", "--out", path.join(dir, "x")]);
    expect(badFormat.code).toBe(2);
    expect(badFormat.stderr).toContain("format");
    const badHeap = await runCommand(database.url, ["export", "--out", path.join(dir, "y")], { LAPSEBANK_EXPORT_HEAP_MB: "lots" });
    expect(badHeap.code).toBe(2);
    expect(badHeap.stderr).toContain("LAPSEBANK_EXPORT_HEAP_MB");
  }, 60_000);
});
