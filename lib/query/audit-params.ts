/**
 * Audit log filter, read from the Audit page's GET form (URL search params). Strict: an unknown
 * parameter is refused by name rather than ignored. Pure: no database, no environment.
 */
import { z } from "zod";
import { strictQueryObject } from "./strict-params.ts";

const blankToUndefined = (v: unknown) => (v === "" || v === null ? undefined : v);
const isoDay = (name: string) =>
  z.preprocess(blankToUndefined, z.string().regex(/^\d{4}-\d{2}-\d{2}$/, { error: `${name} must be a date (YYYY-MM-DD)` })
    .refine((s) => !Number.isNaN(Date.parse(`${s}T00:00:00Z`)), { error: `${name} must be a real date (YYYY-MM-DD)` }).optional());

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
