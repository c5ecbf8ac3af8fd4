/**
 * Setup from the command line on a fresh database: school → site → payload → sensor → calibration →
 * layout with the API's JSON bodies (`create --json` / `--file`), then `ingest` of a generated file
 * with the printed ids, run as users run it (`npm run lapsebank`). A refused body prints the zod
 * messages and exits 1; list and show read back what was made.
 */
import { spawn } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { runSetupCommand } from "../../lib/cli/setup-commands.ts";
import type { SetupCommand } from "../../lib/cli/setup-help.ts";
import { COMMA_COUNTS_LAYOUT, LINEAR_10BIT_CALIBRATION } from "../../seed/demo-files.ts";
import { makeFlightFile } from "../support/flight-files.ts";
import { lapsebankNodeArgs } from "../support/lapsebank-command.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

interface CommandResult {
  code: number | null;
  stdout: string;
  stderr: string;
}

function spawnCommand(databaseUrl: string, args: string[]): Promise<CommandResult> {
  const child = spawn(process.execPath, [...lapsebankNodeArgs(), ...args], { env: { ...process.env, DATABASE_URL: databaseUrl }, stdio: ["ignore", "pipe", "pipe"] });
  let stdout = "";
  let stderr = "";
  child.stdout.on("data", (chunk) => (stdout += chunk));
  child.stderr.on("data", (chunk) => (stderr += chunk));
  return new Promise((resolve) => child.on("exit", (code) => resolve({ code, stdout, stderr })));
}

describe.each(testEngines())("setup commands on %s", (engine) => {
  let database: TestDatabase;
  let dir: string;

  async function run(command: SetupCommand, args: string[]): Promise<CommandResult> {
    const out: string[] = [];
    const err: string[] = [];
    const code = await runSetupCommand(database.db, command, args, { log: (l) => out.push(l), error: (l) => err.push(l) });
    return { code, stdout: out.join("\n"), stderr: err.join("\n") };
  }

  async function create(command: SetupCommand, body: unknown): Promise<string> {
    const result = await run(command, ["create", "--json", JSON.stringify(body)]);
    expect(result.stderr).toBe("");
    expect(result.code).toBe(0);
    return result.stdout.trim();
  }

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    dir = fs.mkdtempSync(path.join(os.tmpdir(), "lapsebank-setup-command-"));
  }, 60_000);

  afterAll(async () => {
    await database?.drop();
    if (dir) fs.rmSync(dir, { recursive: true, force: true });
  });

  test("create school → site → payload → sensor → calibration → layout, then ingest with those ids", async () => {
    const schoolId = await create("schools", { name: "Command Setup School" });
    const siteId = await create("sites", { schoolId, name: "Upper Meadow", latitudeDeg: 47.5, longitudeDeg: 8.7, elevationM: 420, timeZone: "Europe/Zurich" });
    const payloadId = await create("payloads", { schoolId, name: "Box A" });
    const sensorId = await create("sensors", { schoolId, serial: "CLI-1", kind: "10 mV/K voltage sensor", timeConstantS: 1, payloadId, mountedFromUtc: "2020-01-01T00:00:00Z" });
    const calibrationFile = path.join(dir, "calibration.json");
    fs.writeFileSync(calibrationFile, JSON.stringify({ sensorId, spec: LINEAR_10BIT_CALIBRATION, validFromUtc: "2020-01-01T00:00:00Z", method: "datasheet" }));
    const calibration = await run("calibrations", ["create", "--file", calibrationFile]);
    expect(calibration.code).toBe(0);
    const calibrationId = calibration.stdout.trim();
    const layoutId = await create("layouts", { schoolId, spec: COMMA_COUNTS_LAYOUT });

    // Audited like the API's writes, with the command line as the actor.
    const audits = await database.db.auditEvent.findMany({ where: { schoolId }, orderBy: { at: "asc" } });
    expect(audits.map((a) => a.action).sort()).toEqual(["calibration.create", "layout.create", "payload.create", "school.create", "sensor.create", "site.create"]);
    expect(new Set(audits.map((a) => a.actorLabel))).toEqual(new Set(["cli"]));
    expect(await database.db.sensorMount.count({ where: { sensorId, payloadId } })).toBe(1);

    const flight = makeFlightFile({ seed: 7 });
    const file = path.join(dir, "flight-7.csv");
    fs.writeFileSync(file, flight.bytes);
    const ingest = await spawnCommand(database.url, ["ingest", file, "--school", schoolId, "--site", siteId, "--layout", layoutId, "--sensor", sensorId, "--calibration", calibrationId, "--launch", flight.launchAtUtc.toISOString()]);
    expect(ingest.stderr).toBe("");
    expect(ingest.stdout).toContain("1 ingested, 0 failed");
    expect(ingest.code).toBe(0);
    const stored = await database.db.flight.findMany({ where: { schoolId }, select: { siteId: true, layoutId: true } });
    expect(stored).toEqual([{ siteId, layoutId }]);
  }, 120_000);

  test("a refused body prints the zod messages, exits 1 and writes nothing", async () => {
    const before = await database.db.site.count();
    const result = await run("sites", ["create", "--json", JSON.stringify({ schoolId: "x", name: "Far", latitudeDeg: 95, longitudeDeg: 8, elevationM: 9000, timeZone: "Mars/Olympus" })]);
    expect(result.code).toBe(1);
    expect(result.stderr).toContain("latitudeDeg: Latitude must be between −90 and 90°");
    expect(result.stderr).toContain("elevationM: Launch sites above 6000 m are not supported");
    expect(result.stderr).toContain("timeZone: Unknown IANA time zone");
    expect(await database.db.site.count()).toBe(before);

    const notJson = await run("schools", ["create", "--json", "{name:"]);
    expect(notJson.code).toBe(2);
    expect(notJson.stderr).toContain("not JSON");
    const noBody = await run("schools", ["create"]);
    expect(noBody.code).toBe(2);
  });

  test("an overlapping calibration is refused with the API's message", async () => {
    const schoolId = await create("schools", { name: "Overlap School" });
    const sensorId = await create("sensors", { schoolId, serial: "OV-1", kind: "thermistor" });
    const body = { sensorId, spec: LINEAR_10BIT_CALIBRATION, validFromUtc: "2021-01-01T00:00:00Z", method: "datasheet" };
    await create("calibrations", body);
    const second = await run("calibrations", ["create", "--json", JSON.stringify({ ...body, validFromUtc: "2022-01-01T00:00:00Z" })]);
    expect(second.code).toBe(1);
    expect(second.stderr).toContain("overlaps calibration");
  });

  test("list and show read back what was made", async () => {
    const schoolId = await create("schools", { name: "Listing School" });
    const siteId = await create("sites", { schoolId, name: "Quarry Edge", latitudeDeg: 10, longitudeDeg: 20, elevationM: 30, timeZone: "UTC" });
    const listed = await run("sites", ["list", "--school", schoolId]);
    expect(listed.code).toBe(0);
    expect(listed.stdout.split("\n")).toEqual([`${siteId}\tQuarry Edge\t${schoolId}\tUTC`]);
    const shown = await run("sites", ["show", siteId]);
    expect(shown.code).toBe(0);
    expect(JSON.parse(shown.stdout)).toMatchObject({ id: siteId, name: "Quarry Edge", latitudeDeg: 10, elevationM: 30 });
    const missing = await run("payloads", ["show", "no-such-id"]);
    expect(missing.code).toBe(1);
    expect(missing.stderr).toContain("no item with id no-such-id");
    expect((await run("layouts", ["frobnicate"])).code).toBe(2);

    // The same command through `npm run lapsebank`.
    const spawned = await spawnCommand(database.url, ["schools", "list"]);
    expect(spawned.code).toBe(0);
    expect(spawned.stdout).toContain(`${schoolId}\tListing School\tlisting-school`);
  }, 60_000);
});
