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

const ENGINE = Symbol.for("lapsebank.db.engine");

/** Marks a client with its engine; transaction clients read through to it (see engineOf). */
function tagged(db: Db, engine: DbHandle["engine"]): Db {
  Object.defineProperty(db, ENGINE, { value: engine, enumerable: false });
  return db;
}

/**
 * Which engine a client made by createDb (or a transaction client of one) talks to, for code that is
 * handed a client without its DbHandle. Reads the mark createDb puts on the client, no Prisma internals.
 */
export function engineOf(db: Db | DbTransaction): DbHandle["engine"] {
  const engine = (db as unknown as Record<symbol, unknown>)[ENGINE];
  if (engine !== "sqlite" && engine !== "postgres") throw new Error("engineOf: this client was not made by createDb");
  return engine;
}

/** Builds a client for a DATABASE_URL: file: → better-sqlite3 adapter, postgres:// → pg adapter. */
export function createDb(url: string): DbHandle {
  if (isPostgresUrl(url)) {
    const schema = new URL(url).searchParams.get("schema") ?? undefined;
    const adapter = new PrismaPg(
      { connectionString: url, max: 10, ...(schema ? { options: `-c search_path="${schema}"` } : {}) },
      schema ? { schema } : undefined,
    );
    const db = tagged(new PostgresClient({ adapter }) as unknown as Db, "postgres");
    return { db, engine: "postgres", url };
  }
  const adapter = new PrismaBetterSqlite3({ url });
  return { db: tagged(new SqliteClient({ adapter }), "sqlite"), engine: "sqlite", url };
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
