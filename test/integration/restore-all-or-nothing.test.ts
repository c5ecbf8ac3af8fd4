/**
 * A restore either loads the whole backup or leaves the target as it was: damaged entries, wrong
 * manifest counts, checksum mismatches, dates the app cannot read back, entries that inflate past their
 * declared size and a restore process killed mid-way all leave an empty database that a second restore
 * fills. An interrupted restore is remembered, and `npm start`'s pre-flight check refuses to serve it.
 */
import { spawn } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import zlib from "node:zlib";
import { afterAll, afterEach, beforeAll, describe, expect, test } from "vitest";
import { ingestFlightFile } from "../../lib/ingest/index.ts";
import { archiveRowCounts, backupArchive, restoreArchive, RestoreRefused } from "../../lib/export/backup.ts";
import { resetDatabase } from "../../lib/cli/reset.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";
import { lapsebankNodeArgs } from "../support/lapsebank-command.ts";
import { entryLines, linesEntry, readBackup, writeBackup } from "../support/backup-files.ts";

const isEmpty = (counts: Record<string, number>) => Object.values(counts).every((n) => n === 0);

/** Hand-made zip with one deflated entry whose central directory declares `declaredBytes` but whose data inflates to `inflatedBytes`. */
async function zipBomb(file: string, name: string, declaredBytes: number, inflatedBytes: number): Promise<void> {
  const deflate = zlib.createDeflateRaw({ level: 9 });
  const compressed: Buffer[] = [];
  deflate.on("data", (chunk: Buffer) => compressed.push(chunk));
  const block = Buffer.alloc(1 << 20, 0x20); // spaces: JSON whitespace, so only the size can give it away
  for (let done = 0; done < inflatedBytes; done += block.length) {
    if (!deflate.write(block)) await new Promise((resolve) => deflate.once("drain", resolve));
  }
  const ended = new Promise((resolve) => deflate.on("end", resolve));
  deflate.end();
  await ended;
  const data = Buffer.concat(compressed);
  const nameBytes = Buffer.from(name, "utf8");
  const local = Buffer.alloc(30);
  local.writeUInt32LE(0x04034b50, 0);
  local.writeUInt16LE(20, 4);
  local.writeUInt16LE(8, 8);
  local.writeUInt32LE(0, 14); // CRC-32 of the declared content is never reached
  local.writeUInt32LE(data.length, 18);
  local.writeUInt32LE(declaredBytes, 22);
  local.writeUInt16LE(nameBytes.length, 26);
  const central = Buffer.alloc(46);
  central.writeUInt32LE(0x02014b50, 0);
  central.writeUInt16LE(20, 4);
  central.writeUInt16LE(20, 6);
  central.writeUInt16LE(8, 10);
  central.writeUInt32LE(data.length, 20);
  central.writeUInt32LE(declaredBytes, 24);
  central.writeUInt16LE(nameBytes.length, 28);
  central.writeUInt32LE(0, 42);
  const directoryOffset = local.length + nameBytes.length + data.length;
  const end = Buffer.alloc(22);
  end.writeUInt32LE(0x06054b50, 0);
  end.writeUInt16LE(1, 8);
  end.writeUInt16LE(1, 10);
  end.writeUInt32LE(central.length + nameBytes.length, 12);
  end.writeUInt32LE(directoryOffset, 16);
  fs.writeFileSync(file, Buffer.concat([local, nameBytes, data, central, nameBytes, end]));
}

function runCli(databaseUrl: string, args: string[]) {
  const child = spawn(process.execPath, [...lapsebankNodeArgs(), ...args], { env: { ...process.env, DATABASE_URL: databaseUrl }, stdio: ["ignore", "pipe", "pipe"] });
  let stdout = "";
  let stderr = "";
  child.stdout.on("data", (chunk) => (stdout += chunk));
  child.stderr.on("data", (chunk) => (stderr += chunk));
  const exited = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) => child.on("exit", (code, signal) => resolve({ code, signal })));
  return { child, exited, output: () => ({ stdout, stderr }) };
}

describe.each(testEngines())("restore on %s is all or nothing", (engine) => {
  let source: TestDatabase;
  let target: TestDatabase;
  let dir: string;
  let good: string;
  let sourceCounts: Record<string, number>;

  beforeAll(async () => {
    source = await createTestDatabase(engine);
    target = await createTestDatabase(engine);
    dir = fs.mkdtempSync(path.join(os.tmpdir(), "lapsebank-restore-"));
    const ids = await setUpSchool(source.db);
    for (const seed of [51, 52, 53]) {
      const f = makeFlightFile({ seed });
      await ingestFlightFile(source.db, {
        file: { name: `flight-${seed}.csv`, bytes: f.bytes },
        metadata: { schoolId: ids.school.id, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc: new Date(f.launchAtUtc.getTime() + seed * 86_400_000).toISOString() },
      });
    }
    good = path.join(dir, "good.zip");
    await backupArchive(source.db, good);
    sourceCounts = await archiveRowCounts(source.db);
  }, 180_000);

  afterEach(async () => {
    await resetDatabase(target.db);
  });

  afterAll(async () => {
    await source?.drop();
    await target?.drop();
    if (dir) fs.rmSync(dir, { recursive: true, force: true });
  });

  /** Refused with a message matching `message`, nothing written; then the good backup restores in full. */
  async function expectRefusedThenRetryWorks(file: string, message: RegExp) {
    const error = await restoreArchive(target, file).then(() => null, (e: unknown) => e);
    expect(error).toBeInstanceOf(RestoreRefused);
    expect((error as Error).message).toMatch(message);
    expect(isEmpty(await archiveRowCounts(target.db))).toBe(true);
    await restoreArchive(target, good);
    expect(await archiveRowCounts(target.db)).toEqual(sourceCounts);
  }

  test("a damaged entry (one byte changed on disk, CRC-32 no longer matches) leaves the database empty, and a retry succeeds", async () => {
    const { files, manifest } = readBackup(good);
    const name = "tables/FlightSummary-0001.ndjson"; // late in the order: every parent table comes before it
    const damaged = path.join(dir, "damaged.zip");
    writeBackup(damaged, files, manifest, { stored: [name] });
    const bytes = fs.readFileSync(damaged);
    const content = Buffer.from(files[name] as Uint8Array);
    const at = bytes.indexOf(content);
    expect(at).toBeGreaterThan(0);
    // A digit of a number becomes another digit: still valid JSON, so only the CRC can tell.
    const digit = /":(\d)/.exec(content.toString("latin1"));
    const offset = at + (digit?.index ?? 0) + 2;
    bytes[offset] = 0x30 + (((bytes[offset] ?? 0x30) - 0x30 + 1) % 10);
    fs.writeFileSync(damaged, bytes);
    await expectRefusedThenRetryWorks(damaged, /tables\/FlightSummary-0001\.ndjson.*CRC-32/);
  });

  test("a manifest that lists one row too many is refused before anything is written", async () => {
    const { files, manifest } = readBackup(good);
    const table = manifest.tables.find((t) => t.model === "LayerStat");
    if (!table) throw new Error("no LayerStat table");
    table.rows += 1;
    const wrong = path.join(dir, "wrong-count.zip");
    writeBackup(wrong, files, manifest);
    await expectRefusedThenRetryWorks(wrong, new RegExp(`LayerStat: the backup lists ${table.rows} rows but holds ${table.rows - 1}`));
  });

  test("an entry whose bytes do not match the manifest's SHA-256 is refused", async () => {
    const { files, manifest } = readBackup(good);
    const name = "tables/FlightSummary-0001.ndjson";
    const text = new TextDecoder().decode(files[name]);
    files[name] = new TextEncoder().encode(text.replace(/":(\d)/, (_, d: string) => `":${(Number(d) + 1) % 10}`));
    const changed = path.join(dir, "sha-mismatch.zip");
    writeBackup(changed, files, manifest); // a valid zip (fresh CRC-32), the manifest's checksums unchanged
    await expectRefusedThenRetryWorks(changed, /tables\/FlightSummary-0001\.ndjson.*SHA-256/);
  });

  test("a backup in the older format (no per-entry SHA-256) still restores, checked by CRC-32 alone", async () => {
    const { files, manifest } = readBackup(good);
    delete manifest.sha256;
    manifest.formatVersion = 1;
    const older = path.join(dir, "format-1.zip");
    writeBackup(older, files, manifest);
    expect((await restoreArchive(target, older)).formatVersion).toBe(1);
    expect(await archiveRowCounts(target.db)).toEqual(sourceCounts);
  });

  test.each([
    ["Flight", "launchAtUtc", "+010000-01-01T00:00:00.000Z", /tables\/Flight-0001\.ndjson, line 2: launchAtUtc/],
    ["Flight", "launchAtUtc", "1850-06-01T12:00:00.000Z", /tables\/Flight-0001\.ndjson, line 2: launchAtUtc.*before 1900/],
    ["FlightSummary", "launchAtUtc", "1850-06-01T12:00:00.000Z", /tables\/FlightSummary-0001\.ndjson, line 2: launchAtUtc.*before 1900/],
    ["School", "createdAt", "+010000-01-01T00:00:00.000Z", /tables\/School-0001\.ndjson, line 1: createdAt .*years 0001.9999/],
    ["AuditEvent", "at", "not a date", /tables\/AuditEvent-0001\.ndjson, line 2: at /],
  ])("%s.%s = %s in a backup is refused, naming the entry, line and field", async (model, field, value, message) => {
    const { files, manifest } = readBackup(good);
    const name = `tables/${model}-0001.ndjson`;
    const lines = entryLines(files[name]);
    const row = lines.length > 1 ? 1 : 0;
    const record = JSON.parse(lines[row] ?? "{}") as Record<string, unknown>;
    record[field] = value;
    lines[row] = JSON.stringify(record);
    files[name] = linesEntry(lines);
    const edited = path.join(dir, `date-${model}-${field}.zip`);
    writeBackup(edited, files, manifest, { resign: true }); // checksums match: only the date can be refused
    await expectRefusedThenRetryWorks(edited, message);
  });

  test("an entry that inflates far past its declared size is refused with bounded memory", async () => {
    const bomb = path.join(dir, "bomb.zip");
    await zipBomb(bomb, "manifest.json", 1000, 1 << 30);
    expect(fs.statSync(bomb).size).toBeLessThan(2 << 20);
    const peakBeforeKb = process.resourceUsage().maxRSS;
    const error = await restoreArchive(target, bomb).then(() => null, (e: unknown) => e);
    const growthMb = (process.resourceUsage().maxRSS - peakBeforeKb) / 1024;
    expect(error).toBeInstanceOf(RestoreRefused);
    // yauzl's own size check or ours, whichever sees the extra bytes first
    expect((error as Error).message).toMatch(/manifest\.json: .*(more than the 1000 bytes|too many bytes in the stream\. expected 1000\.)/);
    expect(growthMb).toBeLessThan(128); // 1 GiB held in memory before
    expect(isEmpty(await archiveRowCounts(target.db))).toBe(true);
  }, 120_000);

  test("kill -9 of a restore mid-way: nothing is kept, npm start's pre-flight check refuses, and a retry succeeds", async () => {
    // Enough levels that the restore is still writing when it is killed.
    const { files, manifest } = readBackup(good);
    const levelsTable = manifest.tables.find((t) => t.model === "ProfileLevel");
    if (!levelsTable) throw new Error("no ProfileLevel table");
    const levels = levelsTable.parts.flatMap((part) => entryLines(files[part]).map((line) => JSON.parse(line) as Record<string, unknown>));
    let nextId = Math.max(...levels.map((l) => Number(l.id))) + 1;
    const lines: string[] = [];
    for (let copy = 0; lines.length < 120_000; copy++) for (const l of levels) lines.push(JSON.stringify({ ...l, id: nextId++ }));
    const allLines = [...levels.map((l) => JSON.stringify(l)), ...lines];
    for (const part of levelsTable.parts) delete files[part];
    files["tables/ProfileLevel-0001.ndjson"] = linesEntry(allLines);
    levelsTable.parts = ["tables/ProfileLevel-0001.ndjson"];
    levelsTable.rows = allLines.length;
    if (manifest.sha256) for (const part of Object.keys(manifest.sha256)) if (part.startsWith("tables/ProfileLevel-")) delete manifest.sha256[part];
    if (manifest.sha256) manifest.sha256["tables/ProfileLevel-0001.ndjson"] = "";
    const big = path.join(dir, "big.zip");
    writeBackup(big, files, manifest, { resign: true });

    const { checkBeforeServing } = await import("../../lib/cli/preflight.ts");
    expect(await checkBeforeServing(target.db)).toBeNull();

    const run = runCli(target.url, ["restore", big]);
    await new Promise<void>((resolve, reject) => {
      const timer = setInterval(() => {
        if (/Restoring ProfileLevel: \d+ rows/.test(run.output().stdout)) {
          clearInterval(timer);
          run.child.kill("SIGKILL");
          resolve();
        }
      }, 20);
      void run.exited.then(() => {
        clearInterval(timer);
        reject(new Error(`restore ended before it could be killed: ${JSON.stringify(run.output())}`));
      });
    });
    expect((await run.exited).signal).toBe("SIGKILL");

    expect(isEmpty(await archiveRowCounts(target.db))).toBe(true);
    const problem = await checkBeforeServing(target.db);
    expect(problem).toMatch(/restore .*big\.zip.* did not finish/);
    expect(problem).toMatch(/restore .*big\.zip/);
    expect(problem).toMatch(/reset --yes/);

    const blocked = runCli(target.url, ["reprocess", "--all"]);
    expect((await blocked.exited).code).toBe(1);
    expect(blocked.output().stderr).toMatch(/did not finish/);

    const retry = runCli(target.url, ["restore", big]);
    const retried = await retry.exited;
    expect(retry.output().stderr).toBe("");
    expect(retried.code).toBe(0);
    expect(await checkBeforeServing(target.db)).toBeNull();
    expect(await target.db.profileLevel.count()).toBe(allLines.length);
  }, 240_000);

  test("after an interrupted restore, export refuses and `reset --yes` (not plain `reset`) clears the database", async () => {
    await restoreArchive(target, good);
    // The state a killed restore leaves (the test above makes it for real): its marker, committed apart.
    await target.db.restoreMarker.create({ data: { id: "interrupted", backupFile: "/backups/elsewhere.zip", startedAtUtc: new Date("2026-01-01T00:00:00Z") } });
    const { checkBeforeServing } = await import("../../lib/cli/preflight.ts");
    expect(await checkBeforeServing(target.db)).toMatch(/^A restore of \/backups\/elsewhere\.zip started at 2026-01-01T00:00:00\.000Z did not finish/);

    const exported = runCli(target.url, ["export", "--out", path.join(dir, "blocked.zip")]);
    expect((await exported.exited).code).toBe(1);
    expect(exported.output().stderr).toMatch(/did not finish/);
    expect(fs.existsSync(path.join(dir, "blocked.zip"))).toBe(false);

    const asked = runCli(target.url, ["reset"]);
    expect((await asked.exited).code).toBe(1);
    expect(asked.output().stderr).toMatch(/reset --yes` deletes every row .*3 flights, and the mark of an interrupted restore/);
    expect(await checkBeforeServing(target.db)).not.toBeNull();

    const reset = runCli(target.url, ["reset", "--yes"]);
    expect((await reset.exited).code).toBe(0);
    expect(await checkBeforeServing(target.db)).toBeNull();
    expect(isEmpty(await archiveRowCounts(target.db))).toBe(true);
  }, 120_000);
});
