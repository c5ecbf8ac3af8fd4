import { afterAll, beforeAll, describe, expect, test } from "vitest";
import type { Viewer } from "../../lib/auth/visibility.ts";
import { createLayout, IngestFailure, ingestFlightFile } from "../../lib/ingest/index.ts";
import { ClimatologyQueryError, getClimatology } from "../../lib/query/climatology.ts";
import { parseClimatologyQuery } from "../../lib/query/climatology-params.ts";
import { sha256Hex } from "../../lib/ingest/pipeline.ts";
import { generateDemoProgram } from "../../seed/demo-program.ts";
import { loadDemoProgram } from "../../seed/load.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

const LOCAL: Viewer = { kind: "local" };

describe.each(testEngines())("ingest on %s", (engine) => {
  let database: TestDatabase;
  let ids: Awaited<ReturnType<typeof setUpSchool>>;
  const file = makeFlightFile();

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    ids = await setUpSchool(database.db);
  });
  afterAll(async () => {
    await database?.drop();
  });

  const metadata = (extra: Record<string, unknown> = {}) => ({
    schoolId: ids.school.id, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id,
    launchAtUtc: file.launchAtUtc.toISOString(), ...extra,
  });

  async function expectNothingWritten() {
    const db = database.db;
    expect(await db.flight.count()).toBe(0);
    expect(await db.rawFile.count()).toBe(0);
    expect(await db.analysisRun.count()).toBe(0);
    expect(await db.profileLevel.count()).toBe(0);
    expect(await db.flightSummary.count()).toBe(0);
  }

  async function expectFailure(promise: Promise<unknown>): Promise<IngestFailure> {
    const error = await promise.then(() => null, (e: unknown) => e);
    expect(error).toBeInstanceOf(IngestFailure);
    return error as IngestFailure;
  }

  const encode = (text: string) => new TextEncoder().encode(text);
  const lines = file.text.split("\n");
  const headerIndex = lines.findIndex((l) => l.startsWith("seconds"));
  const firstDataLine = headerIndex + 2; // 1-based line number of the first data row

  const headerFields = lines[headerIndex]!.split(",");
  /** The fixture with each data row's fields edited (row = 0 for the first data row). */
  const editRows = (text: string, edit: (fields: string[], row: number) => string[]) => {
    const all = text.split("\n");
    const at = all.findIndex((l) => l.startsWith("seconds"));
    return all.map((l, i) => (i > at && l !== "" ? edit(l.split(","), i - at - 1).join(",") : l)).join("\n");
  };

  // Each malformed file: what to upload, the expected error code, and where it must point.
  const malformed: Array<{ name: string; bytes: () => Uint8Array; code: string; line?: number; column?: number; meta?: Record<string, unknown>; maxBytes?: number }> = [
    { name: "empty.csv", bytes: () => new Uint8Array(), code: "empty-file" },
    { name: "binary.csv", bytes: () => Uint8Array.from([0x50, 0x4b, 0x03, 0x04, 0, 0, 0x14, 0]), code: "binary-file" },
    { name: "latin1.csv", bytes: () => Uint8Array.from([...encode("seconds,gps_alt_m\n"), 0xe9, 0xff, 0x0a]), code: "not-utf8" },
    { name: "semicolons.csv", bytes: () => encode(file.text.replaceAll(",", ";")), code: "missing-column", line: headerIndex + 1 },
    { name: "no-temp-column.csv", bytes: () => encode(file.text.replace("temp_counts", "temperature_raw")), code: "missing-column", line: headerIndex + 1 },
    {
      name: "text-in-number.csv",
      bytes: () => encode(lines.map((l, i) => (i === firstDataLine + 9 ? l.replace(/^(\d+),([^,]+),/, "$1,abc,") : l)).join("\n")),
      code: "bad-rows", line: firstDataLine + 10, column: 2,
    },
    {
      name: "time-backwards.csv",
      bytes: () => encode(lines.map((l, i) => (i === firstDataLine + 19 ? l.replace(/^\d+,/, "3,") : l)).join("\n")),
      code: "bad-rows", line: firstDataLine + 20, column: 1,
    },
    {
      name: "truncated.csv",
      bytes: () => encode(lines.filter((l) => l !== "").join("\n").replace(/,[^,\n]*,[^,\n]*$/, "")),
      code: "bad-rows", line: lines.filter((l) => l !== "").length,
    },
    { name: "header-only.csv", bytes: () => encode(lines.slice(0, headerIndex + 1).join("\n")), code: "no-data" },
    { name: "only-comments.csv", bytes: () => encode("# nothing here\n# still nothing\n"), code: "no-header" },
    { name: "oversized.csv", bytes: () => file.bytes, code: "too-large", maxBytes: 1024 },
    { name: "no-launch-time.csv", bytes: () => file.bytes, code: "launch-time-needed", meta: { launchAtUtc: undefined } },
    { name: "unknown-site.csv", bytes: () => file.bytes, code: "unknown-reference", meta: { siteId: "no-such-site" } },
    { name: "bad-visibility.csv", bytes: () => file.bytes, code: "invalid-metadata", meta: { visibility: "everyone" } },
    { name: "bad-launch-time.csv", bytes: () => file.bytes, code: "invalid-metadata", meta: { launchAtUtc: "next tuesday" } },
    {
      name: "counts-as-kelvin.csv", bytes: () => file.bytes, code: "unit-mismatch",
      meta: { sensorId: undefined, calibrationId: "__direct_kelvin__" },
    },
    {
      // "612,5" for a reading of 612.5 read with a comma layout: every data row has one field too many.
      name: "decimal-comma-as-comma.csv",
      bytes: () => encode(lines.map((l, i) => (i > headerIndex && l !== "" ? `${l},5` : l)).join("\n")),
      code: "bad-rows", line: firstDataLine, column: headerFields.length + 1,
    },
    {
      name: "one-long-row.csv",
      bytes: () => encode(lines.map((l, i) => (i === firstDataLine + 29 ? `${l},0` : l)).join("\n")),
      code: "bad-rows", line: firstDataLine + 30, column: headerFields.length + 1,
    },
    {
      name: "no-ascent.csv",
      bytes: () => encode(lines.map((l) => l.replace(/^(\d+),([^,]+),/, "$1,200.0,")).join("\n")),
      code: "analysis-failed",
    },
  ];

  test("at least 19 malformed files are covered", () => {
    expect(malformed.length).toBeGreaterThanOrEqual(19);
  });

  test.each(malformed)("$name is refused with $code and writes nothing", async (m) => {
    let meta = metadata(m.meta);
    if (m.meta?.calibrationId === "__direct_kelvin__") {
      // A calibration that expects Kelvin readings, used on a file whose layout says raw counts.
      const kelvin = await database.db.calibration.create({ data: { sensorId: ids.sensor.id, spec: { input: "kelvin", sensor: { kind: "direct" } }, validFromUtc: new Date("1990-01-01"), validToUtc: new Date("1990-01-02"), method: "test" } });
      meta = metadata({ ...m.meta, calibrationId: kelvin.id });
    }
    const failure = await expectFailure(
      ingestFlightFile(database.db, { file: { name: m.name, bytes: m.bytes() }, metadata: meta }, { maxUploadBytes: m.maxBytes }),
    );
    expect(failure.code).toBe(m.code);
    expect(failure.issues.length).toBeGreaterThan(0);
    const issue = failure.issues[0]!;
    expect(issue.file).toBe(m.name);
    expect(issue.message.length).toBeGreaterThan(10);
    if (m.line !== undefined) expect(issue.line).toBe(m.line);
    if (m.column !== undefined) expect(issue.column).toBe(m.column);
    await expectNothingWritten();
  });

  test("lenient mode skips bad rows and records them as a QC warning", async () => {
    const bad = encode(lines.map((l, i) => (i === firstDataLine + 9 ? l.replace(/^(\d+),([^,]+),/, "$1,abc,") : l)).join("\n"));
    const result = await ingestFlightFile(database.db, { file: { name: "lenient.csv", bytes: bad }, metadata: metadata({ mode: "lenient" }) });
    expect(result.skippedRowCount).toBe(1);
    expect(result.warnings.some((w) => w.code === "skipped-rows" && w.message.includes(`line ${firstDataLine + 10}`))).toBe(true);
    const run = await database.db.analysisRun.findFirstOrThrow({ where: { flightId: result.flightId } });
    expect(run.skippedRowCount).toBe(1);
    await database.db.flight.delete({ where: { id: result.flightId } });
    await database.db.rawFile.deleteMany();
    await database.db.auditEvent.deleteMany();
  });

  test("lenient mode skips rows longer than the header, each with its line, and QC-flags the flight", async () => {
    const bad = encode(lines.map((l, i) => (i === firstDataLine + 9 || i === firstDataLine + 49 ? `${l},5` : l)).join("\n"));
    const result = await ingestFlightFile(database.db, { file: { name: "lenient-long.csv", bytes: bad }, metadata: metadata({ mode: "lenient" }) });
    expect(result.skippedRowCount).toBe(2);
    expect(result.warnings.some((w) => w.code === "skipped-rows" && w.message.includes(`line ${firstDataLine + 10}`) && w.message.includes("fields"))).toBe(true);
    const summary = await database.db.flightSummary.findFirstOrThrow({ where: { flightId: result.flightId, isCurrent: true } });
    expect(summary.qcFlagged).toBe(true);
    await database.db.flight.delete({ where: { id: result.flightId } });
    await database.db.rawFile.deleteMany();
    await database.db.auditEvent.deleteMany();
  });

  // Files that parse but carry a faulty sensor: stored, QC-flagged, and left out of climatology by default.
  const pressureFile = makeFlightFile({ seed: 11, withPressure: true });
  const column = (name: string) => headerFields.indexOf(name);
  const countsAt = (fields: string[]) => Number(fields[column("temp_counts")]);
  const altitudeAt = (fields: string[]) => Number(fields[column("gps_alt_m")]);
  const withField = (fields: string[], index: number, value: string) => fields.map((f, i) => (i === index ? value : f));
  const stuckFrom = (fromM: number) => {
    let frozen: string | null = null;
    return (fields: string[]) => {
      if (altitudeAt(fields) >= fromM) frozen ??= fields[column("temp_counts")]!;
      return frozen === null ? fields : withField(fields, column("temp_counts"), frozen);
    };
  };
  const pressureColumn = (name: string) => pressureFile.text.split("\n").find((l) => l.startsWith("seconds"))!.split(",").indexOf(name);
  const flagged: Array<{ name: string; text: () => string; flag: string; pressure?: boolean; sensorFault: boolean }> = [
    { name: "stuck-above-6km.csv", text: () => editRows(file.text, stuckFrom(6000)), flag: "temperature-stuck", sensorFault: true },
    { name: "constant-temperature.csv", text: () => editRows(file.text, stuckFrom(-1e9)), flag: "temperature-stuck", sensorFault: true },
    {
      // 60 counts of a 10-bit, 10 mV/K logger ≈ 29 K (REFERENCE.md §7 [D]) on every other row above 3 km
      name: "alternating-temperature.csv",
      text: () => editRows(file.text, (f, row) => (altitudeAt(f) >= 3000 && row % 2 === 1 ? withField(f, column("temp_counts"), String(countsAt(f) + 60)) : f)),
      flag: "temperature-alternating", sensorFault: true,
    },
    {
      name: "altitude-x400.csv", pressure: true, flag: "implausible-altitudes", sensorFault: false,
      text: () => editRows(pressureFile.text, (f) => withField(f, pressureColumn("gps_alt_m"), (Number(f[pressureColumn("gps_alt_m")]) * 400).toFixed(1))),
    },
    {
      name: "negative-altitude.csv", pressure: true, flag: "implausible-altitudes", sensorFault: false,
      text: () => editRows(pressureFile.text, (f) => withField(f, pressureColumn("gps_alt_m"), (-Number(f[pressureColumn("gps_alt_m")]) - 1000).toFixed(1))),
    },
  ];

  test.each(flagged)("$name is stored QC-flagged ($flag) and climatology leaves it out by default", async (f) => {
    const db = database.db;
    const layoutId = f.pressure ? (await createLayout(db, { schoolId: ids.school.id, spec: pressureFile.layout })).id : ids.layout.id;
    const result = await ingestFlightFile(db, { file: { name: f.name, bytes: encode(f.text()) }, metadata: metadata({ layoutId, title: f.name }) });
    try {
      const summary = await db.flightSummary.findFirstOrThrow({ where: { flightId: result.flightId, isCurrent: true } });
      expect(summary.qcFlags.split(",")).toContain(f.flag);
      expect(summary.qcFlagged).toBe(true);
      expect(result.warnings.some((w) => w.code === f.flag)).toBe(true);
      if (f.sensorFault) {
        // A tropopause "found" in a faulty temperature profile does not count, even with QC-flagged flights included.
        expect(summary.tropopauseAltitudeM).toBeNull();
        expect(summary.tropopauseStatus).toBe("undetermined");
      } else {
        // The pressure fallback is kept: the profile still reaches the fixture's 20 km burst.
        expect(Math.abs((summary.burstAltitudeM ?? 0) - 20_000)).toBeLessThan(300); // fixture truth, hypsometric [D]
      }
      const titles = async (qc: "exclude" | "include") => {
        const parsed = parseClimatologyQuery({ groupBy: "none", ...(qc === "include" ? { qc } : {}) });
        if (!parsed.ok) throw new Error(parsed.message);
        const climatology = await getClimatology(LOCAL, parsed.query, database).catch((e: unknown) => {
          if (e instanceof ClimatologyQueryError) return null;
          throw e;
        });
        return climatology?.groups.flatMap((g) => g.flights.map((x) => x.title)) ?? [];
      };
      expect(await titles("exclude")).not.toContain(f.name);
      expect(await titles("include")).toContain(f.name);
    } finally {
      await db.flight.delete({ where: { id: result.flightId } });
      await db.rawFile.deleteMany();
      await db.auditEvent.deleteMany();
      if (f.pressure) await db.loggerLayout.delete({ where: { id: layoutId } });
    }
  });

  test("a failure after some writes leaves no partial flight", async () => {
    for (const stage of ["raw-file", "flight", "run"] as const) {
      const error = await ingestFlightFile(
        database.db,
        { file: { name: "fault.csv", bytes: file.bytes }, metadata: metadata() },
        { afterWrite: (s) => { if (s === stage) throw new Error(`injected fault after ${s}`); } },
      ).then(() => null, (e: unknown) => e as Error);
      expect(error?.message).toBe(`injected fault after ${stage}`);
      await expectNothingWritten();
    }
  });

  test("an upload round-trips: raw bytes kept, provenance and summary stored", async () => {
    const result = await ingestFlightFile(database.db, { file: { name: "good.csv", bytes: file.bytes }, metadata: metadata({ title: "Round trip" }) });
    const db = database.db;
    const flight = await db.flight.findUniqueOrThrow({ where: { id: result.flightId }, include: { rawFile: true, runs: { include: { summary: true } } } });
    expect(Buffer.from(flight.rawFile.bytes).equals(Buffer.from(file.bytes))).toBe(true);
    expect(flight.rawFile.sha256).toBe(sha256Hex(file.bytes));
    expect(flight.rawFile.sizeBytes).toBe(file.bytes.byteLength);
    expect(flight.runs).toHaveLength(1);
    const run = flight.runs[0]!;
    expect(run.isCurrent).toBe(true);
    expect(run.calibrationId).toBe(ids.calibration.id);
    expect(run.analysisVersion).toMatch(/^\d+\.\d+\.\d+$/);
    expect(await db.profileLevel.count({ where: { runId: run.id } })).toBeGreaterThan(100);
    // Invented profile with a 6.5 K/km troposphere and an 11 km tropopause (fixture truth).
    expect(run.summary?.tropopauseAltitudeM ?? 0).toBeGreaterThan(10_700);
    expect(run.summary?.tropopauseAltitudeM ?? 0).toBeLessThan(11_400);
    expect(run.summary?.troposphericLapseRateKPerKm ?? 0).toBeCloseTo(6.5, 0);
    expect(run.summary?.season).toBe("JJA");
    expect(run.summary?.seasonName).toBe("summer");
    expect(await db.auditEvent.count({ where: { entityId: result.flightId, action: "flight.upload" } })).toBe(1);
  });

  test("the same bytes again are refused with a pointer to the existing flight", async () => {
    const first = await database.db.flight.findFirstOrThrow({ where: { title: "Round trip" } });
    const failure = await expectFailure(ingestFlightFile(database.db, { file: { name: "again.csv", bytes: file.bytes }, metadata: metadata() }));
    expect(failure.code).toBe("duplicate");
    expect(failure.existingFlightId).toBe(first.id);
    expect(failure.message).toContain(`/flights/${first.id}`);
    expect(await database.db.flight.count()).toBe(1);
  });

  test("two concurrent uploads of the same file produce exactly one flight", async () => {
    const other = makeFlightFile({ seed: 99 });
    const results = await Promise.allSettled([
      ingestFlightFile(database.db, { file: { name: "a.csv", bytes: other.bytes }, metadata: metadata() }),
      ingestFlightFile(database.db, { file: { name: "b.csv", bytes: other.bytes }, metadata: metadata() }),
    ]);
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    const rejected = results.find((r) => r.status === "rejected") as PromiseRejectedResult;
    expect(rejected.reason).toBeInstanceOf(IngestFailure);
    expect((rejected.reason as IngestFailure).code).toBe("duplicate");
    expect(await database.db.rawFile.count({ where: { sha256: sha256Hex(other.bytes) } })).toBe(1);
  });

  test("demo-style files in both invented layouts load through the pipeline", async () => {
    const program = generateDemoProgram();
    const byLayout = new Map<string, (typeof program.flights)[number]>();
    for (const f of program.flights) if (!byLayout.has(f.layoutKey)) byLayout.set(f.layoutKey, f);
    const fresh = await createTestDatabase(engine);
    try {
      const report = await loadDemoProgram(fresh.db, { program: { ...program, flights: [...byLayout.values()] } });
      expect(report.failures).toEqual([]);
      expect(report.flights).toBe(byLayout.size);
      for (const f of byLayout.values()) {
        const flight = await fresh.db.flight.findFirstOrThrow({ where: { title: f.title }, include: { rawFile: true, summaries: true } });
        expect(Buffer.from(flight.rawFile.bytes).equals(Buffer.from(f.content))).toBe(true);
        const summary = flight.summaries[0]!;
        // The demo stays unflagged: no faulty-sensor or implausible-altitude flag, nothing climatology would drop.
        expect(summary.qcFlags).not.toMatch(/temperature-stuck|temperature-alternating|implausible-altitudes/);
        expect(summary.qcFlagged).toBe(false);
        // The generator's own truth for that invented flight: tropopause within 400 m, lapse rate within 0.8 K/km.
        if (summary.tropopauseAltitudeM !== null) expect(Math.abs(summary.tropopauseAltitudeM - f.truth.tropopauseAltitudeM)).toBeLessThan(400);
        expect(Math.abs((summary.troposphericLapseRateKPerKm ?? 0) - f.truth.lapseRateKPerKm)).toBeLessThan(0.8);
      }
    } finally {
      await fresh.drop();
    }
  });
});
