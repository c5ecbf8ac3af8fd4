"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { getDb } from "@/lib/db";
import {
  calibrationInputSchema, createCalibration, createLayout, createPayload, createSensor, createSite, flightsAnalysedWithOtherSite, OverlappingCalibrationError,
  payloadInputSchema, reprocessFlight, selectFlights, sensorInputSchema, siteInputSchema, suggestLayout, updateCalibration,
  type LayoutSuggestion, type ReprocessOutcome,
} from "@/lib/ingest";
import { loggerLayoutSpecSchema } from "@/lib/ingest/layout";
import { analysisParametersSchema, invitationOnlySchema } from "@/lib/ingest/schemas";
import {
  CalibrationFitError, calibrationFitInputSchema, deleteSetupItem, findSetupItem, fitCalibrationPoints, mountSensor, SETUP_ITEM_KINDS, payloadUpdateSchema, previewLayoutSample,
  sensorMountInputSchema, sensorUpdateSchema, setInvitationOnly, setProgramParameters, SetupConflictError, siteUpdateSchema, updateLayout, updatePayload,
  updateSensor, updateSite, type CalibrationFitResult, type LayoutPreview, type SetupItemKind,
} from "@/lib/ingest/setup-more";
import { currentActor, getViewer } from "@/app/_lib/viewer";
import { actionFailure, actionOk, zodFailure, type ActionResult } from "./_lib/action-result";
import { mayEditProgram, mayEditSchool, NOT_ALLOWED } from "./_lib/permissions";


function refreshSetup() {
  revalidatePath("/setup", "layout");
}

async function mayEdit(schoolId: string): Promise<boolean> {
  return mayEditSchool(await getViewer(), schoolId);
}

/** Known failures become form messages; anything else is a real error. */
function knownFailure(error: unknown): ActionResult<never> {
  if (error instanceof OverlappingCalibrationError) return actionFailure(error.message, { validFromUtc: [error.message] });
  if (error instanceof SetupConflictError) return actionFailure(error.message, error.field ? { [error.field]: [error.message] } : {});
  if (error instanceof CalibrationFitError) return actionFailure(error.message);
  if (typeof error === "object" && error !== null && "code" in error && error.code === "P2002") return actionFailure("That name is already used in this school; choose another");
  throw error;
}

const optionalId = z.preprocess((v) => (v === "" || v === null ? undefined : v), z.string().min(1).max(64).optional());

// --- sites ---------------------------------------------------------------------------------------

const siteFormSchema = siteUpdateSchema.extend({ id: optionalId, schoolId: z.string().min(1, "Choose a school") });

/**
 * Creates a launch site, or corrects one when `id` is given; a correction counts the site's flights
 * whose current run used other site values (the form then offers their re-analysis).
 */
export async function saveSite(input: z.input<typeof siteFormSchema>): Promise<ActionResult<{ id: string; affectedFlightCount: number }>> {
  const parsed = siteFormSchema.safeParse(input);
  if (!parsed.success) return zodFailure(parsed.error);
  const { id, ...data } = parsed.data;
  const db = getDb();
  try {
    if (id) {
      const existing = await db.site.findUnique({ where: { id } });
      if (!existing) return actionFailure("That site no longer exists");
      if (!(await mayEdit(existing.schoolId))) return actionFailure(NOT_ALLOWED);
      const { schoolId: _school, ...changes } = data;
      await updateSite(db, id, changes, await currentActor("web setup"));
      refreshSetup();
      return actionOk({ id, affectedFlightCount: (await flightsAnalysedWithOtherSite(db, id)).length });
    }
    if (!(await mayEdit(data.schoolId))) return actionFailure(NOT_ALLOWED);
    const site = await createSite(db, siteInputSchema.parse(data), await currentActor("web setup"));
    refreshSetup();
    return actionOk({ id: site.id, affectedFlightCount: 0 });
  } catch (error) {
    return knownFailure(error);
  }
}

// --- deleting -------------------------------------------------------------------------------------

const deleteItemSchema = z.object({ kind: z.enum(SETUP_ITEM_KINDS), id: z.string().min(1).max(64) });

const LIST_PATH: Record<Exclude<SetupItemKind, "calibration">, string> = {
  site: "/setup/sites",
  payload: "/setup/payloads",
  sensor: "/setup/sensors",
  layout: "/setup/layouts",
};

/**
 * Deletes a site, payload, sensor, calibration or logger layout that nothing uses (lib/ingest
 * deleteSetupItem says what uses it otherwise). Answers the page to go to next.
 */
export async function deleteSetupItemAction(input: z.input<typeof deleteItemSchema>): Promise<ActionResult<{ nextPath: string }>> {
  const parsed = deleteItemSchema.safeParse(input);
  if (!parsed.success) return zodFailure(parsed.error);
  const { kind, id } = parsed.data;
  const db = getDb();
  try {
    const item = await findSetupItem(db, kind, id);
    if (!item) return actionFailure(`That ${kind} no longer exists`);
    if (!(await mayEdit(item.schoolId))) return actionFailure(NOT_ALLOWED);
    const actor = await currentActor("web setup");
    await db.$transaction((tx) => deleteSetupItem(tx, kind, id, actor));
    refreshSetup();
    return actionOk({ nextPath: kind === "calibration" ? `/setup/sensors/${item.sensorId ?? ""}` : LIST_PATH[kind] });
  } catch (error) {
    return knownFailure(error);
  }
}

// --- payloads ------------------------------------------------------------------------------------

const payloadFormSchema = payloadUpdateSchema.extend({ id: optionalId, schoolId: z.string().min(1, "Choose a school") });

export async function savePayload(input: z.input<typeof payloadFormSchema>): Promise<ActionResult<{ id: string }>> {
  const parsed = payloadFormSchema.safeParse(input);
  if (!parsed.success) return zodFailure(parsed.error);
  const { id, schoolId, ...data } = parsed.data;
  const db = getDb();
  try {
    if (id) {
      const existing = await db.payload.findUnique({ where: { id } });
      if (!existing) return actionFailure("That payload no longer exists");
      if (!(await mayEdit(existing.schoolId))) return actionFailure(NOT_ALLOWED);
      await updatePayload(db, id, data, await currentActor("web setup"));
      refreshSetup();
      return actionOk({ id });
    }
    if (!(await mayEdit(schoolId))) return actionFailure(NOT_ALLOWED);
    const payload = await createPayload(db, payloadInputSchema.parse({ ...data, schoolId }), await currentActor("web setup"));
    refreshSetup();
    return actionOk({ id: payload.id });
  } catch (error) {
    return knownFailure(error);
  }
}

// --- sensors and mounts --------------------------------------------------------------------------

const sensorFormSchema = sensorUpdateSchema.extend({ id: optionalId, schoolId: z.string().min(1, "Choose a school") });

export async function saveSensor(input: z.input<typeof sensorFormSchema>): Promise<ActionResult<{ id: string }>> {
  const parsed = sensorFormSchema.safeParse(input);
  if (!parsed.success) return zodFailure(parsed.error);
  const { id, schoolId, ...data } = parsed.data;
  const db = getDb();
  try {
    if (id) {
      const existing = await db.sensor.findUnique({ where: { id } });
      if (!existing) return actionFailure("That sensor no longer exists");
      if (!(await mayEdit(existing.schoolId))) return actionFailure(NOT_ALLOWED);
      await updateSensor(db, id, data, await currentActor("web setup"));
      refreshSetup();
      return actionOk({ id });
    }
    if (!(await mayEdit(schoolId))) return actionFailure(NOT_ALLOWED);
    const sensor = await createSensor(db, sensorInputSchema.parse({ ...data, schoolId }), await currentActor("web setup"));
    refreshSetup();
    return actionOk({ id: sensor.id });
  } catch (error) {
    return knownFailure(error);
  }
}

/** Puts a sensor into a payload from a date; an earlier open mount is closed then. */
export async function addSensorMount(input: z.input<typeof sensorMountInputSchema>): Promise<ActionResult<{ id: string }>> {
  const parsed = sensorMountInputSchema.safeParse(input);
  if (!parsed.success) return zodFailure(parsed.error);
  const db = getDb();
  const sensor = await db.sensor.findUnique({ where: { id: parsed.data.sensorId } });
  if (!sensor) return actionFailure("That sensor no longer exists");
  if (!(await mayEdit(sensor.schoolId))) return actionFailure(NOT_ALLOWED);
  try {
    const actor = await currentActor("web setup");
    const mount = await db.$transaction((tx) => mountSensor(tx, parsed.data, actor));
    refreshSetup();
    return actionOk({ id: mount.id });
  } catch (error) {
    return knownFailure(error);
  }
}

// --- calibrations --------------------------------------------------------------------------------

const calibrationFormSchema = z.object({ id: optionalId, calibration: z.unknown() });

export interface SavedCalibration {
  id: string;
  sensorId: string;
  /** Flights whose analysis this calibration affects (selectFlights), for the re-analysis offer. */
  affectedFlightCount: number;
}

/**
 * Saves a calibration (new, or a correction of an existing one when `id` is given). A validity
 * period that overlaps another calibration of the same sensor is refused with a clear message.
 */
export async function saveCalibration(input: { id?: string; calibration: unknown }): Promise<ActionResult<SavedCalibration>> {
  const outer = calibrationFormSchema.safeParse(input);
  if (!outer.success) return zodFailure(outer.error);
  const parsed = calibrationInputSchema.safeParse(outer.data.calibration);
  if (!parsed.success) return zodFailure(parsed.error, "The calibration is not complete");
  const db = getDb();
  const sensor = await db.sensor.findUnique({ where: { id: parsed.data.sensorId } });
  if (!sensor) return actionFailure("That sensor no longer exists", { sensorId: ["Choose a sensor"] });
  if (!(await mayEdit(sensor.schoolId))) return actionFailure(NOT_ALLOWED);
  const id = outer.data.id;
  const actor = await currentActor("web setup");
  try {
    if (id) {
      const existing = await db.calibration.findUnique({ where: { id } });
      if (!existing || existing.sensorId !== sensor.id) return actionFailure("That calibration does not belong to this sensor");
    }
    const saved = await db.$transaction(async (tx) => {
      if (!id) return createCalibration(tx, parsed.data, actor);
      const row = await updateCalibration(tx, id, parsed.data);
      await tx.auditEvent.create({
        data: { actorUserId: actor.userId, actorLabel: actor.label, schoolId: sensor.schoolId, action: "calibration.update", entityType: "calibration", entityId: row.id, details: { method: row.method } },
      });
      return row;
    });
    refreshSetup();
    const affected = await selectFlights(db, { calibrationId: saved.id });
    return actionOk({ id: saved.id, sensorId: sensor.id, affectedFlightCount: affected.length });
  } catch (error) {
    return knownFailure(error);
  }
}

/** The calibration helper's fit: coefficients, residuals and a curve for the chart. Nothing is stored. */
export async function fitCalibrationPairs(input: z.input<typeof calibrationFitInputSchema>): Promise<ActionResult<CalibrationFitResult>> {
  const parsed = calibrationFitInputSchema.safeParse(input);
  if (!parsed.success) return zodFailure(parsed.error, "The pairs or the model need attention");
  try {
    return actionOk(fitCalibrationPoints(parsed.data));
  } catch (error) {
    return knownFailure(error);
  }
}

// --- logger layouts ------------------------------------------------------------------------------

const layoutFormSchema = z.object({ id: optionalId, schoolId: z.string().min(1, "Choose a school"), spec: loggerLayoutSpecSchema });

export async function saveLayout(input: { id?: string; schoolId: string; spec: unknown }): Promise<ActionResult<{ id: string; affectedFlightCount: number }>> {
  const parsed = layoutFormSchema.safeParse(input);
  if (!parsed.success) return zodFailure(parsed.error, "The layout is not complete");
  const { id, schoolId, spec } = parsed.data;
  const db = getDb();
  try {
    if (id) {
      const existing = await db.loggerLayout.findUnique({ where: { id } });
      if (!existing) return actionFailure("That layout no longer exists");
      if (!(await mayEdit(existing.schoolId))) return actionFailure(NOT_ALLOWED);
      await updateLayout(db, id, { spec }, await currentActor("web setup"));
      refreshSetup();
      return actionOk({ id, affectedFlightCount: (await selectFlights(db, { layoutId: id })).length });
    }
    if (!(await mayEdit(schoolId))) return actionFailure(NOT_ALLOWED);
    const layout = await createLayout(db, { schoolId, spec }, await currentActor("web setup"));
    refreshSetup();
    return actionOk({ id: layout.id, affectedFlightCount: 0 });
  } catch (error) {
    return knownFailure(error);
  }
}

/** Live preview: the first 64 KB of a dropped sample file read with the layout being edited. */
export async function previewLayout(formData: FormData): Promise<ActionResult<LayoutPreview>> {
  const file = formData.get("file");
  if (!(file instanceof File)) return actionFailure("Drop a sample file to preview");
  let specJson: unknown;
  try {
    specJson = JSON.parse(String(formData.get("spec") ?? ""));
  } catch {
    return actionFailure("The layout could not be read");
  }
  const spec = loggerLayoutSpecSchema.safeParse(specJson);
  if (!spec.success) return zodFailure(spec.error, "Complete the layout to see the preview");
  const bytes = new Uint8Array(await file.slice(0, 64 * 1024 + 1).arrayBuffer());
  return actionOk(await previewLayoutSample(bytes, spec.data, file.name || "sample"));
}

/** A layout guessed from the start of a sample file (delimiter, header, columns), for the editor to start from. */
export async function suggestLayoutFromSample(formData: FormData): Promise<ActionResult<LayoutSuggestion>> {
  const file = formData.get("file");
  if (!(file instanceof File)) return actionFailure("Drop a sample file first");
  const text = new TextDecoder("utf-8").decode(new Uint8Array(await file.slice(0, 16 * 1024).arrayBuffer()));
  try {
    return actionOk(suggestLayout(text, (file.name || "New layout").replace(/\.[^.]+$/, "")));
  } catch (error) {
    return actionFailure(`No layout could be guessed from this file: ${error instanceof Error ? error.message : String(error)}`);
  }
}

// --- program parameters --------------------------------------------------------------------------

export async function saveProgramParameters(input: unknown): Promise<ActionResult<{ affectedFlightCount: number }>> {
  if (!mayEditProgram(await getViewer())) return actionFailure("Only a program administrator may change the analysis parameters");
  const parsed = analysisParametersSchema.safeParse(input);
  if (!parsed.success) return zodFailure(parsed.error, "Some parameters are out of range");
  const db = getDb();
  await setProgramParameters(db, parsed.data, await currentActor("web setup"));
  refreshSetup();
  return actionOk({ affectedFlightCount: (await selectFlights(db, { all: true })).length });
}

/** "Accounts by invitation only": program admins only. */
export async function saveInvitationOnly(input: unknown): Promise<ActionResult<{ invitationOnly: boolean }>> {
  if (!mayEditProgram(await getViewer())) return actionFailure("Only a program administrator may change who can sign up");
  const parsed = invitationOnlySchema.safeParse(input);
  if (!parsed.success) return zodFailure(parsed.error, "Choose on or off");
  const invitationOnly = await setInvitationOnly(getDb(), parsed.data.invitationOnly, await currentActor("web setup"));
  refreshSetup();
  return actionOk({ invitationOnly });
}

// --- re-analysis ---------------------------------------------------------------------------------

const reprocessInputSchema = z.object({ flightId: z.string().min(1).max(64), reason: z.string().trim().min(1).max(200), force: z.boolean().default(false) });

/**
 * Re-analyses one flight from its stored raw bytes (a new current run; the old run is kept). The
 * Setup re-analysis panel calls it flight by flight so it can show progress and stop between flights.
 */
export async function reprocessOneFlight(input: z.input<typeof reprocessInputSchema>): Promise<ActionResult<ReprocessOutcome>> {
  const parsed = reprocessInputSchema.safeParse(input);
  if (!parsed.success) return zodFailure(parsed.error);
  const db = getDb();
  const flight = await db.flight.findFirst({ where: { id: parsed.data.flightId, deletedAt: null }, select: { id: true, schoolId: true } });
  if (!flight) return actionFailure("That flight does not exist");
  if (!(await mayEdit(flight.schoolId))) return actionFailure("You may not re-analyse this school's flights");
  const outcome = await reprocessFlight(db, flight.id, { reason: parsed.data.reason, force: parsed.data.force, actor: await currentActor("web setup") });
  if (outcome.status === "reprocessed") {
    revalidatePath(`/flights/${flight.id}`);
    revalidatePath("/flights");
  }
  return actionOk(outcome);
}
