import { z } from "zod";
import type { QcWarning } from "../analysis/types.ts";

/**
 * JSON columns of an analysis run, read back through a schema instead of a cast: a value an older
 * or damaged row holds in another shape comes back as null with a message the page shows, never as
 * a wrong type that fails somewhere else.
 */
export const storedWarningsSchema = z.array(z.object({ code: z.string(), message: z.string() }));
/** AnalysisRun.removedCounts: rows the quality control removed, by reason. */
export const removedCountsSchema = z.record(z.string(), z.number());
/** AnalysisRun.parameters as compared between runs: named values (their meaning is the analysis's). */
export const parameterRecordSchema = z.record(z.string(), z.unknown());

export type StoredRead<T> = { value: T; problem: null } | { value: null; problem: QcWarning };

/** Parses one stored JSON value; `what` names it in the message ("the QC notes"). */
export function readStoredJson<T>(schema: z.ZodType<T>, value: unknown, what: string): StoredRead<T> {
  const parsed = schema.safeParse(value);
  if (parsed.success) return { value: parsed.data, problem: null };
  const first = parsed.error.issues[0];
  const where = first && first.path.length ? ` at ${first.path.join(".")}` : "";
  return { value: null, problem: { code: "stored-json-unreadable", message: `The stored ${what} of this run could not be read (${first?.message ?? "unexpected shape"}${where}).` } };
}
