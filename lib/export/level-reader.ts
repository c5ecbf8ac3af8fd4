/**
 * Reads binned levels straight through the database driver, as arrays, for exports. Levels are
 * by far the largest table (a 10,000-flight archive holds millions); Prisma's findMany costs about
 * 30 µs a row here, the driver well under 1 µs on SQLite, so an archive export fits its time budget.
 * Callers pass run ids they have already checked against the visibility rule.
 */
import Database from "better-sqlite3";
import pg from "pg";
import { Prisma, type DbHandle } from "../db/index.ts";
import { dialectFor } from "../db/dialect.ts";

/** runId, phase, altitudeM, baseM, topM, sampleCount, temperatureK, temperatureSdK, pressureHpa, relativeHumidityPct */
export type LevelTuple = [string, string, number, number, number, number, number, number | null, number | null, number | null];

export interface LevelReader {
  /** Levels of these runs ordered by run id, phase and altitude. */
  read(runIds: readonly string[]): Promise<LevelTuple[]>;
  close(): Promise<void>;
}

const COLUMNS = Prisma.sql`"runId", "phase", "altitudeM", "baseM", "topM", "sampleCount", "temperatureK", "temperatureSdK", "pressureHpa", "relativeHumidityPct"`;

/** File path of a SQLite URL (file:./data/x.db, file:/abs/x.db?mode=…). */
export function sqlitePath(url: string): string {
  return url.replace(/^file:/, "").replace(/\?.*$/, "");
}

/**
 * pg pool settings for a PostgreSQL DATABASE_URL: Prisma's `schema` parameter becomes the
 * search_path the driver needs; `options` adds more server settings (`-c name=value`).
 */
export function pgPoolConfig(url: string, options: string[] = []): pg.PoolConfig {
  const parsed = new URL(url);
  const schema = parsed.searchParams.get("schema");
  parsed.searchParams.delete("schema");
  const settings = [...options, ...(schema ? [`-c search_path="${schema}"`] : [])];
  return { connectionString: parsed.toString(), ...(settings.length ? { options: settings.join(" ") } : {}) };
}

/** The levels of these runs, as the dialect's one-parameter id list. */
function levelsOf(handle: Pick<DbHandle, "engine">, runIds: readonly string[]): Prisma.Sql {
  const runId = Prisma.sql`"runId"`;
  return Prisma.sql`SELECT ${COLUMNS} FROM "ProfileLevel" WHERE ${dialectFor(handle.engine).inTextList(runId, runIds)} ORDER BY "runId", "phase", "altitudeM"`;
}

export function openLevelReader(handle: Pick<DbHandle, "engine" | "url">): LevelReader {
  if (handle.engine === "sqlite") {
    const database = new Database(sqlitePath(handle.url), { readonly: true, fileMustExist: true });
    // The statement's text does not depend on the ids (one bound list), so it is prepared once.
    const statement = database.prepare(levelsOf(handle, []).sql).raw(true);
    return {
      read: async (runIds) => (runIds.length ? (statement.all(...levelsOf(handle, runIds).values) as LevelTuple[]) : []),
      close: async () => void database.close(),
    };
  }
  const pool = new pg.Pool({ ...pgPoolConfig(handle.url), max: 1 });
  return {
    read: async (runIds) => {
      if (runIds.length === 0) return [];
      const statement = levelsOf(handle, runIds);
      const result = await pool.query<LevelTuple>({ text: statement.text, values: statement.values, rowMode: "array" });
      return result.rows.map((r) => [r[0], r[1], Number(r[2]), Number(r[3]), Number(r[4]), Number(r[5]), Number(r[6]), r[7] === null ? null : Number(r[7]), r[8] === null ? null : Number(r[8]), r[9] === null ? null : Number(r[9])]);
    },
    close: () => pool.end(),
  };
}
