import { readBackup, writeBackup } from "../support/backup-files.ts";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { ingestFlightFile, reprocessFlights, updateCalibration } from "../../lib/ingest/index.ts";
import { archiveRowCounts, backupArchive, BACKUP_MODELS, restoreArchive, RestoreRefused } from "../../lib/export/backup.ts";
import { LINEAR_10BIT_CALIBRATION } from "../../seed/demo-files.ts";
import type { Db } from "../../lib/db/index.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

type Row = Record<string, unknown>;

/** Every row of every backed-up table (raw bytes included), in id order, with values in comparable form. */
async function snapshot(db: Db): Promise<Record<string, Row[]>> {
  const out: Record<string, Row[]> = {};
  for (const codec of BACKUP_MODELS) {
    const rows: Row[] = [];
    let after: string | number | null = null;
    for (;;) {
      const page = await codec.page(db, after, 5000);
      if (page.length === 0) break;
      rows.push(...page);
      after = page[page.length - 1]?.id as string | number;
    }
    out[codec.model] = rows.map((r) => Object.fromEntries(Object.entries(r).map(([k, v]) => [k, v instanceof Date ? v.toISOString() : v])));
  }
  const raw = await db.rawFile.findMany({ orderBy: { id: "asc" }, select: { id: true, bytes: true } });
  out.RawFileBytes = raw.map((r) => ({ id: r.id, hex: Buffer.from(r.bytes).toString("hex") }));
  return out;
}

describe("backup and restore", () => {
  const engines = testEngines();
  const chain = [...engines, "sqlite" as const]; // SQLite → PostgreSQL → SQLite when PostgreSQL is available
  const databases: TestDatabase[] = [];
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "lapsebank-backup-"));

  beforeAll(async () => {
    for (const engine of chain) databases.push(await createTestDatabase(engine));
    const db = databases[0]?.db as Db;
    const ids = await setUpSchool(db);
    for (const seed of [31, 32, 33]) {
      const f = makeFlightFile({ seed });
      await ingestFlightFile(db, {
        file: { name: `flight-${seed}.csv`, bytes: f.bytes },
        metadata: { schoolId: ids.school.id, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc: new Date(f.launchAtUtc.getTime() + seed * 86_400_000).toISOString(), title: seed === 31 ? "=\"quoted\", with comma\nand line" : undefined },
      });
    }
    // A second, non-current run per flight, program settings and a nullable JSON column with a value.
    await updateCalibration(db, ids.calibration.id, { sensorId: ids.sensor.id, spec: { ...LINEAR_10BIT_CALIBRATION, correction: { gain: 0.99, offsetK: -0.3 } }, validFromUtc: new Date("2020-01-01T00:00:00Z"), method: "two-point", referenceReadings: [{ raw: 2981, temperatureK: 298.15 }] });
    await reprocessFlights(db, { all: true }, { reason: "test" });
    await db.programSettings.upsert({ where: { id: 1 }, create: { id: 1, programName: "Invented Program", analysisParameters: { binSizeM: 100 } }, update: {} });
  });
  afterAll(async () => {
    for (const d of databases) await d.drop();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  test(`round trip ${chain.join(" → ")} is lossless, row for row and byte for byte`, async () => {
    const original = await snapshot(databases[0]?.db as Db);
    expect(original.ProfileLevel?.length).toBeGreaterThan(100);
    expect(original.AnalysisRun?.length).toBe(6);
    for (let i = 0; i + 1 < databases.length; i++) {
      const from = databases[i] as TestDatabase;
      const to = databases[i + 1] as TestDatabase;
      const file = path.join(dir, `backup-${i}.zip`);
      const written = await backupArchive(from.db, file);
      const restored = await restoreArchive(to, file);
      expect(restored.rowCounts).toEqual(written.rowCounts);
      expect(restored.rawFiles).toBe(3);
      const copy = await snapshot(to.db);
      for (const model of Object.keys(original)) expect(copy[model], `${model} after ${from.engine} → ${to.engine}`).toEqual(original[model]);
    }
  });

  test("the restored archive keeps working: new levels get fresh ids", async () => {
    const last = databases[databases.length - 1] as TestDatabase;
    const school = await last.db.school.findFirstOrThrow();
    const site = await last.db.site.findFirstOrThrow();
    const layout = await last.db.loggerLayout.findFirstOrThrow();
    const sensor = await last.db.sensor.findFirstOrThrow();
    const f = makeFlightFile({ seed: 34 });
    const result = await ingestFlightFile(last.db, { file: { name: "after-restore.csv", bytes: f.bytes }, metadata: { schoolId: school.id, siteId: site.id, layoutId: layout.id, sensorId: sensor.id, launchAtUtc: f.launchAtUtc.toISOString() } });
    expect(await last.db.profileLevel.count({ where: { run: { flightId: result.flightId } } })).toBeGreaterThan(10);
  });

  test("a backup made before runs recorded their site restores with each run's site filled in as the migration does", async () => {
    const empty = await createTestDatabase("sqlite");
    try {
      const source = databases[0]?.db as Db;
      const file = path.join(dir, "before-site-snapshot.zip");
      await backupArchive(source, file);
      // The same backup without the four run columns, as an older Lapsebank wrote it (format 1: no SHA-256s).
      const { files, manifest } = readBackup(file);
      const columns = ["siteLatitudeDeg", "siteLongitudeDeg", "siteElevationM", "siteTimeZone"];
      for (const name of Object.keys(files).filter((n) => n.startsWith("tables/AnalysisRun-"))) {
        const lines = new TextDecoder().decode(files[name]).split("\n").filter(Boolean);
        const stripped = lines.map((line) => JSON.stringify(Object.fromEntries(Object.entries(JSON.parse(line) as Row).filter(([k]) => !columns.includes(k)))));
        expect(stripped.join("\n")).not.toContain("siteTimeZone");
        files[name] = new TextEncoder().encode(`${stripped.join("\n")}\n`);
      }
      const old = path.join(dir, "old.zip");
      const { sha256: _checksums, ...formatOne } = manifest;
      writeBackup(old, files, { ...formatOne, formatVersion: 1 });
      await restoreArchive(empty, old);
      const select = { id: true, siteLatitudeDeg: true, siteLongitudeDeg: true, siteElevationM: true, siteTimeZone: true } as const;
      const restored = await empty.db.analysisRun.findMany({ orderBy: { id: "asc" }, select });
      expect(restored.length).toBe(6);
      expect(restored).toEqual(await source.analysisRun.findMany({ orderBy: { id: "asc" }, select }));
    } finally {
      await empty.drop();
    }
  });

  test("restore refuses a database that is not empty, and says why", async () => {
    const target = databases[0] as TestDatabase;
    const file = path.join(dir, "refuse.zip");
    await backupArchive(target.db, file);
    const before = await archiveRowCounts(target.db);
    const error = await restoreArchive(target, file).then(() => null, (e: unknown) => e);
    expect(error).toBeInstanceOf(RestoreRefused);
    expect((error as Error).message).toMatch(/not empty \(.*Flight: 3.*\).*empty, migrated database/);
    expect(await archiveRowCounts(target.db)).toEqual(before);
  });

  test("restore refuses a file that is not a backup, or a damaged raw file", async () => {
    const empty = await createTestDatabase("sqlite");
    try {
      const notZip = path.join(dir, "not-a-backup.zip");
      fs.writeFileSync(notZip, "hello");
      await expect(restoreArchive(empty, notZip)).rejects.toThrow(RestoreRefused);

      // Flip one byte of a raw file and zip the backup again: the SHA-256 check must catch it.
      const good = path.join(dir, "good.zip");
      await backupArchive(databases[0]?.db as Db, good);
      const { unzipSync, zipSync } = await import("fflate");
      const files = unzipSync(new Uint8Array(fs.readFileSync(good)));
      const rawName = Object.keys(files).find((n) => n.startsWith("raw/")) ?? "";
      const bytes = files[rawName] as Uint8Array;
      bytes[10] = (bytes[10] ?? 0) ^ 0xff;
      const damaged = path.join(dir, "damaged.zip");
      fs.writeFileSync(damaged, zipSync(files));
      await expect(restoreArchive(empty, damaged)).rejects.toThrow(/does not match its recorded size and SHA-256/);
    } finally {
      await empty.drop();
    }
  });
});
