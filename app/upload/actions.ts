"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { getDb } from "@/lib/db";
import {
  calibrationInputSchema, createCalibration, createLayout, createPayload, createSensor, createSite, IngestFailure,
  ingestFlightFile, layoutInputSchema, loggerLayoutSpecSchema, OverlappingCalibrationError, parseLoggerFile, payloadInputSchema, previewClockZone,
  sensorInputSchema, siteInputSchema, suggestLayout, type IngestIssue, type LayoutSuggestion, type LoggerLayoutSpec,
} from "@/lib/ingest";
import { currentActor, getViewer } from "@/app/_lib/viewer";
import { can, type Action } from "@/lib/auth/permissions";
import { readingViewer, type Viewer } from "@/lib/auth/visibility";
import type { UploadChoices } from "@/lib/query/setup";

export type ActionResult<T> =
  | { ok: true; data: T }
  | { ok: false; message: string; fieldErrors: Record<string, string[]>; code?: string; issues?: IngestIssue[]; existingFlightId?: string | null };

function zodFailure(error: z.ZodError, message = "Some fields need attention"): ActionResult<never> {
  const fieldErrors: Record<string, string[]> = {};
  for (const issue of error.issues) {
    const key = issue.path.join(".") || "form";
    (fieldErrors[key] ??= []).push(issue.message);
  }
  return { ok: false, message, fieldErrors };
}

/** A refusal in the action-result shape when the viewer may not do this for that school. */
function refusal(viewer: Viewer, action: Action, schoolId: string | null): ActionResult<never> | null {
  if (can(viewer, action, { schoolId: schoolId || null })) return null;
  return failure(viewer.kind === "anonymous" ? "Sign in to do this." : "You may not do this for that school.", { code: viewer.kind === "anonymous" ? "unauthenticated" : "forbidden" });
}

function actorOf(viewer: Viewer, label: string) {
  return viewer.kind === "member" ? { userId: viewer.userId, label: viewer.email ?? viewer.userId } : { userId: null, label };
}

function failure(message: string, extra: Partial<Extract<ActionResult<never>, { ok: false }>> = {}): ActionResult<never> {
  return { ok: false, message, fieldErrors: {}, ...extra };
}

/** The preview reads only the start of a file; this much is plenty for the first rows. */
const PREVIEW_BYTES = 64 * 1024;
const PREVIEW_ROWS = 12;

export interface PreviewRow {
  line: number;
  elapsedS: number;
  altitudeM: number | null;
  rawTemperature: number | null;
  pressureHpa: number | null;
  relativeHumidityPct: number | null;
  latitudeDeg: number | null;
  longitudeDeg: number | null;
}

export interface PreviewResult {
  fileName: string;
  /** True when only the start of the file was read. */
  partial: boolean;
  suggestion: LayoutSuggestion | null;
  /** Rows parsed with the chosen layout; null when no layout was chosen or it could not read the file. */
  parsed: { header: string[] | null; rows: PreviewRow[]; skipped: IngestIssue[]; firstRowUtc: string | null } | null;
  /** Why the chosen layout could not read the file, located by line and column. */
  issues: IngestIssue[];
  /** The file's time column carries no date, so the launch time must be given. */
  needsLaunchTime: boolean;
}

const previewFormSchema = z.object({
  layoutId: z.preprocess((v) => (v === "" || v === null ? undefined : v), z.string().max(64).optional()),
  launchAtUtc: z.preprocess((v) => (v === "" || v === null ? undefined : v), z.coerce.date().optional()),
});

/**
 * Parses the first ~64 KB of a chosen file with the chosen layout (lenient, so every bad row is
 * listed) and always returns a suggested layout as well, for when none fits.
 */
export async function previewLoggerFile(formData: FormData): Promise<ActionResult<PreviewResult>> {
  const viewer = await getViewer();
  if (viewer.kind !== "local" && readingViewer(viewer).kind !== "member") return failure("Sign in to preview files.", { code: "unauthenticated" });
  const file = formData.get("file");
  if (!(file instanceof File)) return failure("Choose a file to preview");
  const fields = previewFormSchema.safeParse({ layoutId: formData.get("layoutId"), launchAtUtc: formData.get("launchAtUtc") });
  if (!fields.success) return zodFailure(fields.error);
  let bytes = new Uint8Array(await file.slice(0, PREVIEW_BYTES).arrayBuffer());
  // The browser sends only the start of a large file and says so.
  const partial = file.size > PREVIEW_BYTES || formData.get("truncated") === "1";
  if (partial) {
    // Cut at the last newline so the preview never sees a half line (or half a UTF-8 character).
    const lastNewline = bytes.lastIndexOf(0x0a);
    if (lastNewline > 0) bytes = bytes.subarray(0, lastNewline + 1);
  }
  const name = file.name || "upload";
  let suggestion: LayoutSuggestion | null = null;
  try {
    suggestion = suggestLayout(new TextDecoder("utf-8").decode(bytes.subarray(0, 16 * 1024)), name.replace(/\.[^.]+$/, "") || "New layout");
  } catch {
    suggestion = null;
  }
  if (!fields.data.layoutId) {
    return { ok: true, data: { fileName: name, partial, suggestion, parsed: null, issues: [], needsLaunchTime: false } };
  }
  const layoutRow = await getDb().loggerLayout.findUnique({ where: { id: fields.data.layoutId } });
  if (!layoutRow) return failure("That logger layout no longer exists");
  const spec = loggerLayoutSpecSchema.safeParse(layoutRow.spec);
  if (!spec.success) return failure(`The stored layout is invalid: ${spec.error.issues.map((i) => i.message).join("; ")}`);
  const clockAnchor = fields.data.launchAtUtc ?? new Date(Date.UTC(2000, 0, 1, 12));
  try {
    const parsed = await parseLoggerFile(bytes, spec.data, { fileName: name, mode: "lenient", clockAnchorUtc: clockAnchor, clockZone: previewClockZone(spec.data.columns.time.clockZone), maxIssues: 20 });
    const rows: PreviewRow[] = parsed.samples.slice(0, PREVIEW_ROWS).map((s) => ({
      line: s.sourceLine, elapsedS: s.elapsedS, altitudeM: s.altitudeM, rawTemperature: s.rawTemperature, pressureHpa: s.pressureHpa,
      relativeHumidityPct: s.relativeHumidityPct, latitudeDeg: s.latitudeDeg, longitudeDeg: s.longitudeDeg,
    }));
    const timeFormat = spec.data.columns.time.format;
    return {
      ok: true,
      data: {
        fileName: name, partial, suggestion,
        parsed: {
          header: parsed.header,
          rows,
          skipped: parsed.skippedRows.slice(0, 20),
          firstRowUtc: timeFormat === "iso-datetime" && parsed.fileStartUtc ? parsed.fileStartUtc.toISOString() : null,
        },
        issues: [],
        needsLaunchTime: timeFormat !== "iso-datetime",
      },
    };
  } catch (error) {
    if (error instanceof IngestFailure) {
      return { ok: true, data: { fileName: name, partial, suggestion, parsed: null, issues: error.issues, needsLaunchTime: false } };
    }
    throw error;
  }
}

export interface UploadedFlight {
  flightId: string;
  url: string;
  title: string;
  launchAtUtc: string;
  tropopauseAltitudeM: number | null;
  troposphericLapseRateKPerKm: number | null;
  warnings: Array<{ code: string; message: string }>;
  skippedRowCount: number;
}

/** Uploads one file with its metadata through the shared ingest pipeline. */
export async function uploadFlightFile(formData: FormData): Promise<ActionResult<UploadedFlight>> {
  const viewer = await getViewer();
  const file = formData.get("file");
  if (!(file instanceof File)) return failure("Choose a file to upload", { fieldErrors: { file: ["Choose a file"] } });
  const metadata: Record<string, string> = {};
  for (const [key, value] of formData.entries()) {
    if (key !== "file" && typeof value === "string") metadata[key] = value;
  }
  const refused = refusal(viewer, "flight.upload", metadata.schoolId ?? null);
  if (refused) return refused;
  try {
    const result = await ingestFlightFile(getDb(), {
      file: { name: file.name || "upload.txt", bytes: new Uint8Array(await file.arrayBuffer()) },
      metadata,
      actor: actorOf(viewer, "web upload"),
    });
    revalidatePath("/flights");
    revalidatePath("/");
    return {
      ok: true,
      data: {
        flightId: result.flightId, url: `/flights/${result.flightId}`, title: result.title, launchAtUtc: result.launchAtUtc.toISOString(),
        tropopauseAltitudeM: result.tropopauseAltitudeM, troposphericLapseRateKPerKm: result.troposphericLapseRateKPerKm,
        warnings: result.warnings, skippedRowCount: result.skippedRowCount,
      },
    };
  } catch (error) {
    if (error instanceof IngestFailure) {
      const message = error.code === "duplicate" ? "This file was already uploaded for this school" : error.issues.length === 1 ? (error.issues[0]?.message ?? error.code) : `${error.issues.length} problems found`;
      return failure(message, { code: error.code, issues: error.issues, existingFlightId: error.existingFlightId });
    }
    throw error;
  }
}

type Site = UploadChoices["sites"][number];
type Layout = UploadChoices["layouts"][number];
type Payload = UploadChoices["payloads"][number];
type Sensor = UploadChoices["sensors"][number];

function numberOrUndefined(value: FormDataEntryValue | null): string | undefined {
  return typeof value === "string" && value.trim() !== "" ? value : undefined;
}

/** Creates a launch site for a school from the inline "new site" form. */
export async function createSiteFromForm(formData: FormData): Promise<ActionResult<Site>> {
  const refused = refusal(await getViewer(), "setup.edit", String(formData.get("schoolId") ?? ""));
  if (refused) return refused;
  const parsed = siteInputSchema.safeParse({
    schoolId: formData.get("schoolId"), name: formData.get("name"),
    latitudeDeg: numberOrUndefined(formData.get("latitudeDeg")), longitudeDeg: numberOrUndefined(formData.get("longitudeDeg")),
    elevationM: numberOrUndefined(formData.get("elevationM")), timeZone: formData.get("timeZone"),
  });
  if (!parsed.success) return zodFailure(parsed.error);
  const site = await createSite(getDb(), parsed.data, await currentActor("web upload"));
  revalidatePath("/upload");
  return { ok: true, data: { id: site.id, schoolId: site.schoolId, name: site.name, latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM, timeZone: site.timeZone } };
}

/** Creates a payload from the inline "new payload" form. */
export async function createPayloadFromForm(formData: FormData): Promise<ActionResult<Payload>> {
  const refused = refusal(await getViewer(), "setup.edit", String(formData.get("schoolId") ?? ""));
  if (refused) return refused;
  const parsed = payloadInputSchema.safeParse({ schoolId: formData.get("schoolId"), name: formData.get("name"), notes: formData.get("notes") ?? "" });
  if (!parsed.success) return zodFailure(parsed.error);
  const payload = await createPayload(getDb(), parsed.data, await currentActor("web upload"));
  revalidatePath("/upload");
  return { ok: true, data: { id: payload.id, schoolId: payload.schoolId, name: payload.name } };
}

/** Saves a logger layout built in the inline layout editor. */
export async function saveLoggerLayout(input: { schoolId: string; spec: LoggerLayoutSpec }): Promise<ActionResult<Layout>> {
  const refused = refusal(await getViewer(), "setup.edit", input.schoolId);
  if (refused) return refused;
  const parsed = layoutInputSchema.safeParse(input);
  if (!parsed.success) return zodFailure(parsed.error, "The layout is not complete");
  const layout = await createLayout(getDb(), parsed.data, await currentActor("web upload"));
  revalidatePath("/upload");
  return { ok: true, data: { id: layout.id, schoolId: layout.schoolId, name: layout.name, spec: layout.spec } };
}

class CalibrationInputError extends Error {
  constructor(readonly zodError: z.ZodError) {
    super("Invalid calibration");
  }
}

const sensorWithCalibrationSchema = z.object({
  schoolId: z.string().min(1, "Choose a school"),
  /** Existing sensor to add the calibration to; absent to create a new sensor. */
  sensorId: z.string().min(1).optional(),
  sensor: sensorInputSchema.omit({ schoolId: true }).optional(),
  // Validated in full by createCalibration (calibrationInputSchema) once the sensor id is known.
  calibration: z.record(z.string(), z.unknown()),
});

/** Creates a sensor with its first calibration, or adds a calibration to an existing sensor, in one transaction. */
export async function saveSensorCalibration(input: z.input<typeof sensorWithCalibrationSchema>): Promise<ActionResult<Sensor>> {
  const parsed = sensorWithCalibrationSchema.safeParse(input);
  if (!parsed.success) return zodFailure(parsed.error);
  const { schoolId, sensorId, sensor, calibration } = parsed.data;
  const refused = refusal(await getViewer(), "setup.edit", schoolId);
  if (refused) return refused;
  if (!sensorId && !sensor) return failure("Describe the new sensor or choose an existing one", { fieldErrors: { "sensor.serial": ["Give the sensor's serial"] } });
  const db = getDb();
  const actor = await currentActor("web upload");
  try {
    const id = await db.$transaction(async (tx) => {
      let targetId = sensorId;
      if (targetId) {
        const existing = await tx.sensor.findUnique({ where: { id: targetId } });
        if (!existing || existing.schoolId !== schoolId) throw new Error("That sensor does not belong to this school");
      } else if (sensor) {
        targetId = (await createSensor(tx, { ...sensor, schoolId }, actor)).id;
      }
      if (!targetId) throw new Error("No sensor");
      const checked = calibrationInputSchema.safeParse({ ...calibration, sensorId: targetId });
      if (!checked.success) throw new CalibrationInputError(checked.error);
      await createCalibration(tx, checked.data, actor);
      return targetId;
    });
    revalidatePath("/upload");
    const row = await db.sensor.findUniqueOrThrow({
      where: { id },
      select: {
        id: true, schoolId: true, serial: true, kind: true, timeConstantS: true,
        calibrations: { orderBy: { validFromUtc: "desc" }, select: { id: true, method: true, validFromUtc: true, validToUtc: true, spec: true } },
      },
    });
    return {
      ok: true,
      data: { ...row, calibrations: row.calibrations.map((c) => ({ ...c, validFromUtc: c.validFromUtc.toISOString(), validToUtc: c.validToUtc?.toISOString() ?? null })) },
    };
  } catch (error) {
    if (error instanceof OverlappingCalibrationError) return failure(error.message, { fieldErrors: { "calibration.validFromUtc": [error.message] } });
    if (error instanceof CalibrationInputError) {
      const result = zodFailure(error.zodError, "The calibration is not complete");
      if (!result.ok) result.fieldErrors = Object.fromEntries(Object.entries(result.fieldErrors).map(([k, v]) => [`calibration.${k}`, v]));
      return result;
    }
    if (error instanceof Error && error.message === "That sensor does not belong to this school") return failure(error.message);
    throw error;
  }
}
