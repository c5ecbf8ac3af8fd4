/**
 * A synthetic archive for benchmarks: many invented flights (default 10,000, ~300 levels each)
 * written straight to the database with multi-row INSERTs, skipping the ingest pipeline for speed.
 * Every flight is marked synthetic = true. The profiles are simple (a lapse rate that depends on
 * season and latitude, a tropopause, an isothermal layer, an occasional dawn surface inversion);
 * they exist to load the climatology queries, not to be studied.
 */
import type { DbHandle } from "../lib/db/index.ts";
import { meteorologicalSeason, seasonLabel } from "../lib/analysis/season.ts";
import { createPrng } from "./prng.ts";

export interface SyntheticArchiveOptions {
  flights?: number;
  levelsPerFlight?: number;
  binSizeM?: number;
  seed?: number;
  onProgress?: (done: number, total: number) => void;
}

export interface SyntheticArchiveReport {
  schoolId: string;
  siteIds: string[];
  flights: number;
  levels: number;
  elapsedMs: number;
}

const SITES = [
  { name: "Synthetic Plain North", latitudeDeg: 52.1, longitudeDeg: 10.4, elevationM: 80 },
  { name: "Synthetic Hills North", latitudeDeg: 47.6, longitudeDeg: 8.9, elevationM: 450 },
  { name: "Synthetic High Plain", latitudeDeg: 39.8, longitudeDeg: -104.6, elevationM: 1600 },
  { name: "Synthetic Coast West", latitudeDeg: 44.2, longitudeDeg: -123.9, elevationM: 20 },
  { name: "Synthetic Subtropic", latitudeDeg: 27.4, longitudeDeg: -81.3, elevationM: 30 },
  { name: "Synthetic South Coast", latitudeDeg: -34.6, longitudeDeg: 150.7, elevationM: 60 },
  { name: "Synthetic South Plateau", latitudeDeg: -31.2, longitudeDeg: 136.8, elevationM: 900 },
  { name: "Synthetic Far North", latitudeDeg: 64.8, longitudeDeg: -147.7, elevationM: 140 },
];

const FLIGHTS_PER_CHUNK = 200;
const LEVEL_ROWS_PER_INSERT = 4000;

function dateLiteral(engine: DbHandle["engine"], ms: number): string {
  const iso = new Date(ms).toISOString();
  // SQLite keeps Prisma DateTimes as ISO text with an explicit offset; PostgreSQL has timestamp(3).
  return engine === "sqlite" ? `'${iso.replace("Z", "+00:00")}'` : `'${iso.slice(0, 23).replace("T", " ")}'`;
}

function bytesLiteral(engine: DbHandle["engine"], text: string): string {
  const hex = Buffer.from(text, "utf8").toString("hex");
  return engine === "sqlite" ? `X'${hex}'` : `decode('${hex}', 'hex')`;
}

function n(value: number | null, digits = 3): string {
  return value === null ? "NULL" : value.toFixed(digits);
}

function dayOfYear(year: number, month: number, day: number): number {
  return Math.round((Date.UTC(year, month - 1, day) - Date.UTC(year, 0, 1)) / 86_400_000) + 1;
}

/**
 * Writes the synthetic archive into an empty or existing database (its own school and sites).
 * Deterministic for a seed. Ids are prefixed "syn<seed>-" so two archives with different seeds can
 * share a database.
 */
export async function writeSyntheticArchive(handle: Pick<DbHandle, "db" | "engine">, options: SyntheticArchiveOptions = {}): Promise<SyntheticArchiveReport> {
  const started = performance.now();
  const total = options.flights ?? 10_000;
  const levelsPerFlight = options.levelsPerFlight ?? 300;
  const binSizeM = options.binSizeM ?? 100;
  const seed = options.seed ?? 10_000;
  const { db, engine } = handle;
  const tag = `syn${seed}`;
  const rng = createPrng(seed);

  const school = await db.school.create({ data: { slug: `${tag}-school`, name: `Synthetic benchmark school ${seed}` } });
  const sites = [];
  for (const s of SITES) {
    sites.push(await db.site.create({ data: { ...s, name: `${s.name} ${seed}`, schoolId: school.id, timeZone: "UTC" } }));
  }
  const layout = await db.loggerLayout.create({ data: { schoolId: school.id, name: `${tag} layout`, spec: { note: "synthetic archive: no logger file" } } });
  const now = Date.UTC(2026, 0, 1);
  let levelCount = 0;

  for (let start = 0; start < total; start += FLIGHTS_PER_CHUNK) {
    const end = Math.min(total, start + FLIGHTS_PER_CHUNK);
    const rawFiles: string[] = [];
    const flights: string[] = [];
    const runs: string[] = [];
    const summaries: string[] = [];
    const levels: string[] = [];
    for (let i = start; i < end; i++) {
      const siteIndex = i % sites.length;
      const site = sites[siteIndex] as (typeof sites)[number];
      const def = SITES[siteIndex] as (typeof SITES)[number];
      const year = 2015 + (i % 11);
      const month = 1 + rng.int(0, 11);
      const day = 1 + rng.int(0, 27);
      const localHour = 5 + rng.uniform(0, 11);
      const offsetH = Math.round(def.longitudeDeg / 15);
      const launchMs = Date.UTC(year, month - 1, day) + (localHour - offsetH) * 3_600_000;
      const season = meteorologicalSeason(month, def.latitudeDeg);
      const seasonName = seasonLabel(season, def.latitudeDeg);
      // Summer-like months (by hemisphere) get steeper lapse rates and a higher tropopause.
      const summerness = Math.cos(((month - (def.latitudeDeg >= 0 ? 7 : 1)) / 12) * 2 * Math.PI);
      const lapseKPerKm = 6.2 + 0.5 * summerness + 0.35 * (rng.uniform(-1, 1) + rng.uniform(-1, 1));
      const tropopauseM = 11_000 + 1200 * summerness - Math.abs(def.latitudeDeg - 45) * 20 + rng.uniform(-800, 800);
      const surfaceK = 283 + 9 * summerness + rng.uniform(-3, 3);
      const hoursAfterSunrise = localHour - (6.5 - 1.5 * summerness);
      const inversion = hoursAfterSunrise < 2 && rng.uniform(0, 1) < 0.7;
      const inversionDepthM = inversion ? 150 + rng.uniform(0, 400) : null;
      const inversionStrengthK = inversion ? 1 + rng.uniform(0, 5) : null;
      const solarElevationDeg = Math.max(-5, 60 * Math.sin((Math.PI * Math.max(0, hoursAfterSunrise)) / 13) * (0.6 + 0.4 * summerness));
      const flightId = `${tag}-f${i}`;
      const runId = `${tag}-r${i}`;
      const rawId = `${tag}-b${i}`;
      const title = `Synthetic flight ${i + 1}`;
      rawFiles.push(`('${rawId}', '${school.id}', 'synthetic-${i}.csv', 0, '${tag}-sha-${i}', ${bytesLiteral(engine, "synthetic")}, ${dateLiteral(engine, now)})`);
      flights.push(
        `('${flightId}', '${school.id}', '${site.id}', '${layout.id}', '${rawId}', '${title}', '', ${dateLiteral(engine, launchMs)}, 'program', TRUE, ${dateLiteral(engine, now)}, ${dateLiteral(engine, now)})`,
      );
      runs.push(`('${runId}', '${flightId}', 'synthetic', '{}', '{}', '{}', '[]', '', '{}', ${levelsPerFlight}, 0, ${site.latitudeDeg}, ${site.longitudeDeg}, ${site.elevationM}, '${site.timeZone}', 'synthetic', TRUE, ${dateLiteral(engine, now)})`);

      const groundM = def.elevationM;
      const firstBin = Math.floor(groundM / binSizeM);
      const tropopauseK = surfaceK - (lapseKPerKm * (tropopauseM - groundM)) / 1000;
      const temperatureAt = (z: number): number => {
        if (inversion && inversionDepthM !== null && inversionStrengthK !== null && z < groundM + inversionDepthM) {
          const top = surfaceK - (lapseKPerKm * inversionDepthM) / 1000;
          return top - inversionStrengthK * (1 - (z - groundM) / inversionDepthM);
        }
        if (z <= tropopauseM) return surfaceK - (lapseKPerKm * (z - groundM)) / 1000;
        if (z <= tropopauseM + 8000) return tropopauseK;
        return tropopauseK + (z - tropopauseM - 8000) / 1000;
      };
      let maxM = groundM;
      for (let k = 0; k < levelsPerFlight; k++) {
        const baseM = (firstBin + k) * binSizeM;
        const altitudeM = baseM + binSizeM / 2 + rng.uniform(-5, 5);
        const temperatureK = temperatureAt(altitudeM) + rng.uniform(-0.15, 0.15);
        maxM = altitudeM;
        levels.push(`('${runId}', 'ascent', ${n(altitudeM)}, ${n(baseM, 1)}, ${n(baseM + binSizeM, 1)}, 20, ${n(temperatureK)})`);
      }
      levelCount += levelsPerFlight;
      const minM = firstBin * binSizeM + binSizeM / 2;
      const tropopauseFound = tropopauseM + 2000 < maxM;
      summaries.push(
        `('${tag}-s${i}', '${runId}', '${flightId}', TRUE, '${school.id}', '${site.id}', ${dateLiteral(engine, launchMs)}, ${year}, ${month}, ${dayOfYear(year, month, day)}, '${season}', '${seasonName}', ${n(localHour)}, ${n(hoursAfterSunrise)}, ${n(solarElevationDeg)}, ${def.latitudeDeg}, ${n(groundM)}, ${n(maxM)}, ${n(maxM)}, ${n(minM)}, ${n(surfaceK)}, ${n(lapseKPerKm, 4)}, 0.05, ${tropopauseFound ? n(tropopauseM) : "NULL"}, ${tropopauseFound ? n(tropopauseK) : "NULL"}, NULL, '${tropopauseFound ? "found" : "not-found"}', NULL, ${inversion ? "TRUE" : "FALSE"}, ${n(inversionDepthM)}, ${n(inversionStrengthK)}, NULL, FALSE, ${n(groundM)}, '', FALSE)`,
      );
    }
    const statements = [
      `INSERT INTO "RawFile" ("id", "schoolId", "name", "sizeBytes", "sha256", "bytes", "uploadedAt") VALUES ${rawFiles.join(", ")}`,
      `INSERT INTO "Flight" ("id", "schoolId", "siteId", "layoutId", "rawFileId", "title", "notes", "launchAtUtc", "visibility", "synthetic", "createdAt", "updatedAt") VALUES ${flights.join(", ")}`,
      `INSERT INTO "AnalysisRun" ("id", "flightId", "analysisVersion", "parameters", "calibrationSpec", "layoutSpec", "warnings", "qcFlags", "removedCounts", "rowCount", "skippedRowCount", "siteLatitudeDeg", "siteLongitudeDeg", "siteElevationM", "siteTimeZone", "reason", "isCurrent", "createdAt") VALUES ${runs.join(", ")}`,
      `INSERT INTO "FlightSummary" ("id", "runId", "flightId", "isCurrent", "schoolId", "siteId", "launchAtUtc", "year", "month", "dayOfYear", "season", "seasonName", "localHour", "hoursAfterSunrise", "solarElevationDeg", "latitudeDeg", "launchAltitudeM", "burstAltitudeM", "maxAltitudeM", "minAltitudeM", "surfaceTemperatureK", "troposphericLapseRateKPerKm", "troposphericLapseRateStdErrKPerKm", "tropopauseAltitudeM", "tropopauseTemperatureK", "tropopausePressureHpa", "tropopauseStatus", "secondTropopauseAltitudeM", "hasSurfaceInversion", "surfaceInversionDepthM", "surfaceInversionStrengthK", "stratosphericLapseRateKPerKm", "hasDescent", "groundElevationM", "qcFlags", "qcFlagged") VALUES ${summaries.join(", ")}`,
    ];
    for (let k = 0; k < levels.length; k += LEVEL_ROWS_PER_INSERT) {
      statements.push(`INSERT INTO "ProfileLevel" ("runId", "phase", "altitudeM", "baseM", "topM", "sampleCount", "temperatureK") VALUES ${levels.slice(k, k + LEVEL_ROWS_PER_INSERT).join(", ")}`);
    }
    await db.$transaction(async (tx) => {
      for (const statement of statements) await tx.$executeRawUnsafe(statement);
    }, { timeout: 120_000 });
    options.onProgress?.(end, total);
  }
  return { schoolId: school.id, siteIds: sites.map((s) => s.id), flights: total, levels: levelCount, elapsedMs: performance.now() - started };
}
