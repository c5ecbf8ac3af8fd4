/** Logger layouts: the schemas, audited create and replacement, and the sample preview. */
import { z } from "zod";
import { Prisma } from "../../db/index.ts";
import type { Actor } from "../store.ts";
import { audit, auditCreate, inTransaction, SETUP_ACTOR, type DbLike } from "./common.ts";
import { IngestFailure, type IngestIssue } from "../errors.ts";
import { loggerLayoutSpecSchema, type LoggerLayoutSpec } from "../layout.ts";
import { parseLoggerFile } from "../parse.ts";
import { previewClockZone } from "../clock-zone.ts";

export const layoutInputSchema = z.object({ schoolId: z.string().min(1), spec: loggerLayoutSpecSchema });

/** Creates a logger layout (audited as layout.create, in the same transaction). */
export async function createLayout(db: DbLike, input: z.input<typeof layoutInputSchema>, actor: Actor = SETUP_ACTOR) {
  const data = layoutInputSchema.parse(input);
  return inTransaction(db, async (tx) => {
    const layout = await tx.loggerLayout.create({ data: { schoolId: data.schoolId, name: data.spec.name, spec: data.spec as unknown as Prisma.InputJsonValue } });
    await auditCreate(tx, actor, layout.schoolId, "layout", layout.id, { name: layout.name });
    return layout;
  });
}

// --- logger layouts -----------------------------------------------------------------------------

export const layoutUpdateSchema = z.object({ spec: loggerLayoutSpecSchema });

/**
 * Replaces a logger layout's spec (and name). Runs made with the old spec keep their own copy, so
 * nothing published is lost; reprocessing the layout's flights applies the new one.
 */
export async function updateLayout(db: DbLike, layoutId: string, input: z.input<typeof layoutUpdateSchema>, actor: Actor = SETUP_ACTOR) {
  const { spec } = layoutUpdateSchema.parse(input);
  const layout = await db.loggerLayout.update({ where: { id: layoutId }, data: { name: spec.name, spec: spec as unknown as Prisma.InputJsonValue } });
  await audit(db, actor, layout.schoolId, "layout.update", "layout", layout.id, { name: spec.name });
  return layout;
}

// --- layout preview -----------------------------------------------------------------------------

/** The live preview reads only the start of a sample file. */
export const LAYOUT_PREVIEW_BYTES = 64 * 1024;
const LAYOUT_PREVIEW_ROWS = 15;

export interface LayoutPreview {
  fileName: string;
  /** True when only the first 64 KB were read. */
  partial: boolean;
  header: string[] | null;
  dataRowCount: number;
  rows: Array<{ line: number; elapsedS: number; altitudeM: number | null; rawTemperature: number | null; pressureHpa: number | null; relativeHumidityPct: number | null; latitudeDeg: number | null; longitudeDeg: number | null }>;
  /** Rows the layout could not read (lenient parse), each with line and column. */
  skipped: IngestIssue[];
  /** Why the layout cannot read the file at all, located by line and column. */
  issues: IngestIssue[];
}

/**
 * Parses the first 64 KB of a sample file with a (possibly unsaved) layout, leniently, so the
 * editor can show the rows it reads and every row it cannot, with line and column.
 */
export async function previewLayoutSample(bytes: Uint8Array, spec: LoggerLayoutSpec, fileName: string): Promise<LayoutPreview> {
  let head = bytes.subarray(0, LAYOUT_PREVIEW_BYTES);
  const partial = bytes.byteLength > LAYOUT_PREVIEW_BYTES;
  if (partial) {
    // Cut at the last newline so the preview never sees half a line.
    const lastNewline = head.lastIndexOf(0x0a);
    if (lastNewline > 0) head = head.subarray(0, lastNewline + 1);
  }
  const empty = { fileName, partial, header: null, dataRowCount: 0, rows: [], skipped: [] };
  try {
    const parsed = await parseLoggerFile(head, spec, { fileName, mode: "lenient", clockAnchorUtc: new Date(Date.UTC(2000, 0, 1, 12)), clockZone: previewClockZone(spec.columns.time.clockZone), maxIssues: 20 });
    return {
      fileName, partial, header: parsed.header, dataRowCount: parsed.dataRowCount,
      rows: parsed.samples.slice(0, LAYOUT_PREVIEW_ROWS).map((s) => ({
        line: s.sourceLine, elapsedS: s.elapsedS, altitudeM: s.altitudeM, rawTemperature: s.rawTemperature, pressureHpa: s.pressureHpa,
        relativeHumidityPct: s.relativeHumidityPct, latitudeDeg: s.latitudeDeg, longitudeDeg: s.longitudeDeg,
      })),
      skipped: parsed.skippedRows.slice(0, 20),
      issues: [],
    };
  } catch (error) {
    if (error instanceof IngestFailure) return { ...empty, issues: error.issues };
    throw error;
  }
}
