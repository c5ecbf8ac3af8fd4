/**
 * CSV cells for exports: RFC 4180 quoting, numbers at full precision, ISO 8601 UTC times, and a
 * guard against spreadsheet formula injection on every text cell. Pure: no I/O.
 */

/** Characters that make a spreadsheet read a cell as a formula or a control [P: OWASP CSV injection]. */
const FORMULA_TRIGGERS = new Set(["=", "+", "-", "@", "\t", "\r"]);

/** The prefix that disarms a text cell; a cell that already begins with it gets one more, so the guard can be undone exactly. */
export const GUARD_PREFIX = "'";

/**
 * Disarms a text cell: text starting with = + - @ tab or CR (or with the guard quote itself) gets a
 * leading apostrophe. Spreadsheets show it as text; readers undo it with unguardTextCell.
 */
export function guardTextCell(text: string): string {
  const first = text.charAt(0);
  return FORMULA_TRIGGERS.has(first) || first === GUARD_PREFIX ? GUARD_PREFIX + text : text;
}

/** The exact inverse of guardTextCell. */
export function unguardTextCell(cell: string): string {
  return cell.startsWith(GUARD_PREFIX) ? cell.slice(GUARD_PREFIX.length) : cell;
}

/**
 * A number as the shortest text that reads back to the same double (ECMAScript Number::toString),
 * so export → parse gives the stored value bit for bit. Negative zero keeps its sign.
 * Non-finite numbers never reach an export (the database holds none); they are written as missing.
 */
export function formatNumberCell(value: number): string {
  if (!Number.isFinite(value)) return "";
  return Object.is(value, -0) ? "-0" : String(value);
}

/** Quotes a cell when it holds a delimiter, a quote or a line break (RFC 4180). */
export function quoteCell(cell: string): string {
  return /[",\r\n]/.test(cell) ? `"${cell.replace(/"/g, '""')}"` : cell;
}

export type CellValue = string | number | boolean | Date | null | undefined | { readonly json: unknown };

/**
 * One cell: null/undefined → empty (the package's missing value), numbers at full precision,
 * booleans true/false, dates as ISO 8601 UTC with milliseconds, JSON values as compact JSON text
 * (guarded like any text), strings guarded and quoted.
 */
export function csvCell(value: CellValue): string {
  if (value === null || value === undefined) return "";
  if (typeof value === "number") return formatNumberCell(value);
  if (typeof value === "boolean") return value ? "true" : "false";
  if (value instanceof Date) return value.toISOString();
  if (typeof value === "object") return quoteCell(guardTextCell(JSON.stringify(value.json) ?? "null"));
  return quoteCell(guardTextCell(value));
}

/** One CSV record with CRLF line end (RFC 4180). */
export function csvLine(values: readonly CellValue[]): string {
  return `${values.map(csvCell).join(",")}\r\n`;
}
