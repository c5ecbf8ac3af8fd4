/**
 * Audit log filter, read from the Audit page's GET form (URL search params). Strict: an unknown
 * parameter is refused by name rather than ignored. Pure: no database, no environment.
 */
import { z } from "zod";
import { parseDroppingProblems, strictQueryObject } from "./strict-params.ts";

const blankToUndefined = (v: unknown) => (v === "" || v === null ? undefined : v);
/** A calendar day "YYYY-MM-DD" that exists (2026-02-30 does not). */
const isRealDay = (s: string) => /^\d{4}-\d{2}-\d{2}$/.test(s) && new Date(`${s}T00:00:00Z`).toISOString().slice(0, 10) === s;
const isoDay = (name: string) =>
  z.preprocess(blankToUndefined, z.string().refine((s) => { try { return isRealDay(s); } catch { return false; } }, { error: `${name} must be a date (YYYY-MM-DD)` }).optional());

export const AUDIT_PAGE_SIZE = 50;

export const auditFilterSchema = strictQueryObject({
  school: z.preprocess(blankToUndefined, z.string().max(64).optional()),
  person: z.preprocess(blankToUndefined, z.string().max(64).optional()),
  action: z.preprocess(blankToUndefined, z.string().max(64).optional()),
  from: isoDay("from"),
  to: isoDay("to"),
  demo: z.preprocess(blankToUndefined, z.enum(["show"], { error: 'demo must be "show" or empty' }).optional()),
  page: z.preprocess(blankToUndefined, z.coerce.number({ error: "page must be a whole number" }).int().min(1).default(1)),
}).refine((f) => f.from === undefined || f.to === undefined || f.from <= f.to, { error: "from must not be after to", path: ["from"] });

export type AuditFilter = z.infer<typeof auditFilterSchema>;

export const AUDIT_FILTER_KEYS = ["school", "person", "action", "from", "to", "demo", "page"] as const;

/**
 * Reads the Audit page's address. A parameter that is unknown or does not validate is dropped and
 * named in `problems` (the page shows them), so one bad value does not throw away the rest.
 */
export function parseAuditFilter(record: Record<string, string>): { filter: AuditFilter; problems: string[] } {
  const { value, problems } = parseDroppingProblems(auditFilterSchema, record);
  return { filter: value, problems };
}

/** The address of the Audit page for `filter` with some values changed (blank values left out). */
export function auditHref(filter: AuditFilter, changes: Partial<Record<(typeof AUDIT_FILTER_KEYS)[number], string | undefined>> = {}): string {
  const params = new URLSearchParams();
  for (const key of AUDIT_FILTER_KEYS) {
    const value = key in changes ? changes[key] : filter[key] === undefined ? undefined : String(filter[key]);
    if (value !== undefined && value !== "" && !(key === "page" && value === "1")) params.set(key, value);
  }
  const query = params.toString();
  return query ? `/audit?${query}` : "/audit";
}
