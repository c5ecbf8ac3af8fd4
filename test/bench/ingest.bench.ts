import { parse as parseCsvSync } from "csv-parse/sync";
import { createLayout, createSchool, createSensor, createCalibration, createSite, ingestFlightFile, parseLoggerFile } from "../../lib/ingest/index.ts";
import { generateBenchmarkFile } from "../../seed/demo-files.ts";
import { createTestDatabase, type Engine } from "../support/test-databases.ts";
import type { BenchResult } from "./types.ts";

const ROWS = 14_400;
const REPEATS = 8;

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.floor(sorted.length / 2)] ?? Number.NaN;
}

/**
 * Ingest of a 4-hour, 1 Hz file (14,400 rows) per engine, against two baselines measured in the
 * same run: csv-parse alone on the same text (parse-only), and our layout parser alone.
 */
export async function benchIngest(engines: Engine[]): Promise<BenchResult[]> {
  const file = generateBenchmarkFile(ROWS, 42);
  const text = file.content;
  const results: BenchResult[] = [];

  const parseOnly: number[] = [];
  for (let i = 0; i < REPEATS; i++) {
    const t0 = performance.now();
    parseCsvSync(text, { comment: "#", relax_column_count: true, skip_empty_lines: true });
    parseOnly.push(performance.now() - t0);
  }
  const parseOnlyMs = median(parseOnly);
  results.push({ name: "csv-parse alone, 14,400 rows (baseline)", value: parseOnlyMs, unit: "ms" });

  const layoutParse: number[] = [];
  const bytes = new TextEncoder().encode(text);
  for (let i = 0; i < REPEATS; i++) {
    const t0 = performance.now();
    await parseLoggerFile(bytes, file.layout, { fileName: "bench.csv", mode: "strict" });
    layoutParse.push(performance.now() - t0);
  }
  results.push({ name: "layout parse (streaming, with validation)", value: median(layoutParse), unit: "ms", note: `${(median(layoutParse) / parseOnlyMs).toFixed(2)}× parse-only` });

  for (const engine of engines) {
    const database = await createTestDatabase(engine);
    try {
      const db = database.db;
      const school = await createSchool(db, { name: "Bench School" });
      const site = await createSite(db, { schoolId: school.id, name: "Bench Field", latitudeDeg: 45.3, longitudeDeg: 7.9, elevationM: 250, timeZone: "Europe/Rome" });
      const sensor = await createSensor(db, { schoolId: school.id, serial: "B-1", kind: "10 mV/K", timeConstantS: 4 });
      await createCalibration(db, { sensorId: sensor.id, spec: file.calibration, validFromUtc: new Date("2020-01-01"), method: "datasheet" });
      const layout = await createLayout(db, { schoolId: school.id, spec: file.layout });
      const times: number[] = [];
      for (let i = 0; i < REPEATS; i++) {
        // A distinct trailing comment per repeat gives distinct bytes (duplicates are refused).
        const variant = new TextEncoder().encode(`${text}# repeat ${i}\n`);
        const t0 = performance.now();
        await ingestFlightFile(db, {
          file: { name: `bench-${i}.csv`, bytes: variant },
          metadata: { schoolId: school.id, siteId: site.id, layoutId: layout.id, sensorId: sensor.id, launchAtUtc: "2024-06-01T06:05:00Z" },
        });
        times.push(performance.now() - t0);
      }
      const ms = median(times);
      results.push({ name: `ingest on ${engine}, 14,400 rows (parse+calibrate+analyse+store)`, value: ms, unit: "ms/flight", note: `${Math.round(ROWS / (ms / 1000)).toLocaleString("en")} rows/s; ${(ms / parseOnlyMs).toFixed(2)}× parse-only (target ≤ 3×${engine === "sqlite" ? ", ≤ 250 ms" : ""})` });
    } finally {
      await database.drop();
    }
  }
  return results;
}
