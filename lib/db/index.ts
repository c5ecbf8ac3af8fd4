import { PrismaBetterSqlite3 } from "@prisma/adapter-better-sqlite3";
import { PrismaPg } from "@prisma/adapter-pg";
import { getEnv, isPostgresUrl } from "../env.ts";
import { PrismaClient as SqliteClient } from "./generated/sqlite/client.ts";
import { PrismaClient as PostgresClient } from "./generated/postgres/client.ts";

export { Prisma } from "./generated/sqlite/client.ts";
export type { ProgramSettings, School, User, Membership, Session, Invitation, ApiToken, LoginThrottle, SignInAddress, Site, Payload, Sensor, SensorMount, Calibration, LoggerLayout, RawFile, Flight, AnalysisRun, ProfileLevel, LayerStat, FlightSummary, AuditEvent } from "./generated/sqlite/client.ts";

/**
 * The one database type the app uses. Both generated clients come from the same model
 * (prisma/postgres/schema.prisma is generated from prisma/schema.prisma), so the PostgreSQL
 * client has the same shape and is exposed under the SQLite client's type.
 */
export type Db = SqliteClient;
export type DbTransaction = Parameters<Parameters<Db["$transaction"]>[0]>[0];

export interface DbHandle {
  db: Db;
  engine: "sqlite" | "postgres";
  url: string;
}

/** Builds a client for a DATABASE_URL: file: → better-sqlite3 adapter, postgres:// → pg adapter. */
export function createDb(url: string): DbHandle {
  if (isPostgresUrl(url)) {
    const schema = new URL(url).searchParams.get("schema") ?? undefined;
    const adapter = new PrismaPg(
      { connectionString: url, max: 10, ...(schema ? { options: `-c search_path="${schema}"` } : {}) },
      schema ? { schema } : undefined,
    );
    const db = new PostgresClient({ adapter }) as unknown as Db;
    return { db, engine: "postgres", url };
  }
  const adapter = new PrismaBetterSqlite3({ url });
  return { db: new SqliteClient({ adapter }), engine: "sqlite", url };
}

const globalForDb = globalThis as unknown as { lapsebankDb?: DbHandle };

/** The process-wide client, created once and cached on globalThis (survives dev reloads). */
export function getDbHandle(): DbHandle {
  globalForDb.lapsebankDb ??= createDb(getEnv().DATABASE_URL);
  return globalForDb.lapsebankDb;
}

export function getDb(): Db {
  return getDbHandle().db;
}
