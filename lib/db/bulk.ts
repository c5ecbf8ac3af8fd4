import { engineOf, Prisma, type Db, type DbTransaction } from "./index.ts";

export interface ProfileLevelRow {
  phase: string;
  altitudeM: number;
  baseM: number;
  topM: number;
  sampleCount: number;
  temperatureK: number;
  temperatureSdK: number | null;
  pressureHpa: number | null;
  relativeHumidityPct: number | null;
}

const CHUNK_ROWS = 1000; // 10 parameters a row stays under SQLite's and PostgreSQL's limits

/**
 * Inserts a run's levels with multi-row INSERTs. Prisma's createMany through the driver adapters
 * costs about half a second for a typical flight's ~600 levels; this is 5–8× faster on both engines.
 */
export async function insertProfileLevels(db: Db | DbTransaction, runId: string, levels: readonly ProfileLevelRow[]): Promise<void> {
  if (levels.length === 0) return;
  if (engineOf(db) === "postgres") {
    // One statement with ten array parameters: far cheaper than thousands of bound values.
    const column = <K extends keyof ProfileLevelRow>(key: K) => levels.map((l) => l[key]);
    await db.$executeRaw`INSERT INTO "ProfileLevel" ("runId", "phase", "altitudeM", "baseM", "topM", "sampleCount", "temperatureK", "temperatureSdK", "pressureHpa", "relativeHumidityPct")
      SELECT ${runId}, * FROM unnest(${column("phase")}::text[], ${column("altitudeM")}::float8[], ${column("baseM")}::float8[], ${column("topM")}::float8[],
        ${column("sampleCount")}::int[], ${column("temperatureK")}::float8[], ${column("temperatureSdK")}::float8[], ${column("pressureHpa")}::float8[],
        ${column("relativeHumidityPct")}::float8[])`;
    return;
  }
  for (let start = 0; start < levels.length; start += CHUNK_ROWS) {
    const rows = levels.slice(start, start + CHUNK_ROWS).map(
      (l) => Prisma.sql`(${runId}, ${l.phase}, ${l.altitudeM}, ${l.baseM}, ${l.topM}, ${l.sampleCount}, ${l.temperatureK}, ${l.temperatureSdK}, ${l.pressureHpa}, ${l.relativeHumidityPct})`,
    );
    await db.$executeRaw`INSERT INTO "ProfileLevel" ("runId", "phase", "altitudeM", "baseM", "topM", "sampleCount", "temperatureK", "temperatureSdK", "pressureHpa", "relativeHumidityPct") VALUES ${Prisma.join(rows)}`;
  }
}
