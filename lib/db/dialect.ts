/**
 * SQL that differs between SQLite and PostgreSQL, in one place. Every fragment is a Prisma.Sql:
 * values travel as bound parameters (Prisma numbers them for the engine when the statement runs),
 * and Prisma.raw is used only for identifiers checked by `identifier` and for fixed keywords.
 * Code elsewhere writes SQL that both engines read the same way and asks the dialect for the rest.
 */
import { Prisma } from "./generated/sqlite/client.ts";

export type Engine = "sqlite" | "postgres";

export interface Dialect {
  readonly engine: Engine;
  /** A timestamp column as ISO 8601 UTC text to the second: "2026-03-01T09:30:00Z". */
  isoUtcSeconds(column: Prisma.Sql): Prisma.Sql;
  /** The timestamp column falls on or after this UTC day ("YYYY-MM-DD"). */
  onOrAfterDay(column: Prisma.Sql, day: string): Prisma.Sql;
  /** The timestamp column falls on or before this UTC day ("YYYY-MM-DD"). */
  onOrBeforeDay(column: Prisma.Sql, day: string): Prisma.Sql;
  /**
   * floor(value / width) as an integer-valued number, for values from −`lowest` up, with `lowest`
   * a multiple of `width` (SQLite's CAST truncates toward zero; shifting by `lowest` makes it a floor).
   */
  floorDivide(value: Prisma.Sql, width: number, lowest: number): Prisma.Sql;
  /** A number as a typed floating-point value (PostgreSQL cannot type a bare parameter in a select list). */
  real(value: number): Prisma.Sql;
  /**
   * A column the planner should not reach through an index: on SQLite a unary "+" keeps it on one
   * sequential scan when an index would pick most rows one lookup at a time; PostgreSQL decides by statistics.
   */
  unindexed(column: Prisma.Sql): Prisma.Sql;
  /** The text values of `expression` over a group, joined by `separator` in the order of `orderBy`. */
  stringAgg(expression: Prisma.Sql, separator: string, orderBy: Prisma.Sql): Prisma.Sql;
  /** `column` is one of these text values, bound as ONE parameter however long the list. */
  inTextList(column: Prisma.Sql, values: readonly string[]): Prisma.Sql;
  /** Statements that set a table's serial "id" counter past its rows after ids were inserted (none on SQLite). */
  resetIdSequence(table: string): Prisma.Sql[];
}

const IDENTIFIER = /^[A-Za-z_][A-Za-z0-9_]*$/;

/** A quoted identifier ("Name"), the same on both engines; anything but letters, digits and _ is refused. */
export function identifier(name: string): Prisma.Sql {
  if (!IDENTIFIER.test(name)) throw new Error(`invalid SQL identifier ${JSON.stringify(name)}`);
  return Prisma.raw(`"${name}"`);
}

/** alias."column", both parts checked as identifiers. */
export function column(alias: string, name: string): Prisma.Sql {
  return Prisma.sql`${identifier(alias)}.${identifier(name)}`;
}

/** "(a) AND (b) AND (c)", or TRUE for no conditions. */
export function and(parts: readonly Prisma.Sql[]): Prisma.Sql {
  return parts.length === 0 ? Prisma.sql`TRUE` : Prisma.join(parts.map((p) => Prisma.sql`(${p})`), " AND ");
}

/** "(?, ?, ?)" for a non-empty list of values. */
export function list(values: readonly (string | number)[]): Prisma.Sql {
  if (values.length === 0) throw new Error("an IN list needs at least one value");
  return Prisma.join(values, ", ", "(", ")");
}

/** A finite number as SQL floating-point literal text ("3" → "3.0"). */
function realLiteral(value: number, what: string): Prisma.Sql {
  if (!Number.isFinite(value)) throw new Error(`${what} must be a finite number`);
  return Prisma.raw(Number.isInteger(value) ? `${value}.0` : String(value));
}

function checkedDay(day: string): string {
  if (!/^\d{4}-\d{2}-\d{2}$/.test(day)) throw new Error(`invalid day ${JSON.stringify(day)}; expected YYYY-MM-DD`);
  return day;
}

/** SQLite keeps DateTime columns as ISO 8601 text (Prisma writes "YYYY-MM-DDTHH:MM:SS.sssZ"). */
export const sqliteDialect: Dialect = {
  engine: "sqlite",
  isoUtcSeconds: (c) => Prisma.sql`substr(${c}, 1, 19) || 'Z'`,
  onOrAfterDay: (c, day) => Prisma.sql`substr(${c}, 1, 10) >= ${checkedDay(day)}`,
  onOrBeforeDay: (c, day) => Prisma.sql`substr(${c}, 1, 10) <= ${checkedDay(day)}`,
  floorDivide(value, width, lowest) {
    if (!(width > 0) || lowest < 0 || lowest % width !== 0) throw new Error("floorDivide needs width > 0 and lowest a multiple of width");
    return Prisma.sql`(CAST((${value} + ${realLiteral(lowest, "lowest")}) / ${realLiteral(width, "width")} AS INTEGER) - ${Prisma.raw(String(lowest / width))})`;
  },
  real: (value) => Prisma.sql`CAST(${value} AS REAL)`,
  unindexed: (c) => Prisma.sql`+${c}`,
  stringAgg: (expression, separator, orderBy) => Prisma.sql`group_concat(${expression}, ${separator} ORDER BY ${orderBy})`,
  inTextList: (c, values) => Prisma.sql`${c} IN (SELECT value FROM json_each(${JSON.stringify(values)}))`,
  resetIdSequence(table) {
    identifier(table);
    return []; // AUTOINCREMENT follows the largest inserted id
  },
};

export const postgresDialect: Dialect = {
  engine: "postgres",
  isoUtcSeconds: (c) => Prisma.sql`to_char(${c}, 'YYYY-MM-DD"T"HH24:MI:SS"Z"')`,
  onOrAfterDay: (c, day) => Prisma.sql`${c} >= CAST(${checkedDay(day)} AS timestamp)`,
  onOrBeforeDay: (c, day) => Prisma.sql`${c} < CAST(${checkedDay(day)} AS timestamp) + INTERVAL '1 day'`,
  floorDivide(value, width) {
    return Prisma.sql`FLOOR(${value} / ${realLiteral(width, "width")})`;
  },
  real: (value) => Prisma.sql`CAST(${value} AS DOUBLE PRECISION)`,
  unindexed: (c) => c,
  stringAgg: (expression, separator, orderBy) => Prisma.sql`string_agg(${expression}, ${separator} ORDER BY ${orderBy})`,
  inTextList: (c, values) => Prisma.sql`${c} = ANY(CAST(${[...values]} AS text[]))`,
  resetIdSequence(table) {
    const quoted = `"${table}"`;
    identifier(table);
    return [Prisma.sql`SELECT setval(pg_get_serial_sequence(${quoted}, 'id'), COALESCE((SELECT MAX("id") FROM ${identifier(table)}), 0) + 1, false)`];
  },
};

export function dialectFor(engine: Engine): Dialect {
  return engine === "postgres" ? postgresDialect : sqliteDialect;
}
