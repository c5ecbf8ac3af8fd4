import { z } from "zod";
import type { Db, DbTransaction } from "../db/index.ts";
import { Prisma } from "../db/index.ts";
import { isValidTimeZone } from "../analysis/launch-time.ts";
import { loggerLayoutSpecSchema } from "./layout.ts";
import { storableDateInputSchema, temperatureCalibrationSchema } from "./schemas.ts";
import type { Actor } from "./store.ts";

type DbLike = Db | DbTransaction;

const SETUP_ACTOR: Actor = { userId: null, label: "setup" };

/**
 * Runs `work` in a transaction: the caller's, when `db` already is one, otherwise a new one. A
 * create and its audit row are written together or not at all.
 */
async function inTransaction<T>(db: DbLike, work: (tx: DbTransaction) => Promise<T>): Promise<T> {
  const client = db as Partial<Pick<Db, "$transaction">>;
  return typeof client.$transaction === "function" ? (db as Db).$transaction(work) : work(db as DbTransaction);
}

async function auditCreate(tx: DbTransaction, actor: Actor, schoolId: string | null, entityType: string, entityId: string, details: Prisma.InputJsonValue) {
  await tx.auditEvent.create({ data: { actorUserId: actor.userId, actorLabel: actor.label, schoolId, action: `${entityType}.create`, entityType, entityId, details } });
}

export const schoolInputSchema = z.object({
  name: z.string().trim().min(2).max(120),
  slug: z.string().trim().regex(/^[a-z0-9][a-z0-9-]{1,60}$/, "Use lower-case letters, digits and dashes").optional(),
});

export const siteInputSchema = z.object({
  schoolId: z.string().min(1),
  name: z.string().trim().min(2).max(120),
  latitudeDeg: z.coerce.number().min(-90, "Latitude must be between −90 and 90°").max(90, "Latitude must be between −90 and 90°"),
  longitudeDeg: z.coerce.number().min(-180, "Longitude must be between −180 and 180°").max(180, "Longitude must be between −180 and 180°"),
  elevationM: z.coerce.number().min(-450, "Elevation below −450 m is not on land").max(6000, "Launch sites above 6000 m are not supported"),
  timeZone: z.string().trim().refine(isValidTimeZone, "Unknown IANA time zone (e.g. Europe/Berlin, America/Denver)"),
});

export const payloadInputSchema = z.object({ schoolId: z.string().min(1), name: z.string().trim().min(1).max(120), notes: z.string().max(2000).default("") });

export const sensorInputSchema = z.object({
  schoolId: z.string().min(1),
  serial: z.string().trim().min(1).max(80),
  kind: z.string().trim().min(1).max(80),
  timeConstantS: z.coerce.number().min(0).max(600).default(0),
  notes: z.string().max(2000).default(""),
  payloadId: z.string().min(1).optional(),
  mountedFromUtc: storableDateInputSchema().optional(),
  mountedToUtc: storableDateInputSchema().nullable().optional(),
});

export const calibrationInputSchema = z
  .object({
    sensorId: z.string().min(1),
    spec: temperatureCalibrationSchema,
    validFromUtc: storableDateInputSchema(),
    validToUtc: storableDateInputSchema().nullable().default(null),
    method: z.string().trim().min(1).max(80),
    referenceReadings: z.array(z.object({ raw: z.number().finite(), temperatureK: z.number().finite() })).optional(),
    notes: z.string().max(2000).default(""),
  })
  .refine((c) => !c.validToUtc || c.validToUtc > c.validFromUtc, { path: ["validToUtc"], message: "The end of validity must be after its start" });

export const layoutInputSchema = z.object({ schoolId: z.string().min(1), spec: loggerLayoutSpecSchema });

export function slugify(name: string): string {
  return name.toLowerCase().normalize("NFKD").replace(/[^a-z0-9]+/g, "-").replace(/^-+|-+$/g, "").slice(0, 60) || "school";
}

/** Creates a school (audited as school.create). */
export async function createSchool(db: DbLike, input: z.input<typeof schoolInputSchema>, actor: Actor = SETUP_ACTOR) {
  const data = schoolInputSchema.parse(input);
  return inTransaction(db, async (tx) => {
    const school = await tx.school.create({ data: { name: data.name, slug: data.slug ?? slugify(data.name) } });
    await auditCreate(tx, actor, school.id, "school", school.id, { name: school.name, slug: school.slug });
    return school;
  });
}

/** Creates a launch site (audited as site.create, in the same transaction). */
export async function createSite(db: DbLike, input: z.input<typeof siteInputSchema>, actor: Actor = SETUP_ACTOR) {
  const data = siteInputSchema.parse(input);
  return inTransaction(db, async (tx) => {
    const site = await tx.site.create({ data });
    await auditCreate(tx, actor, site.schoolId, "site", site.id, { name: site.name, latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM, timeZone: site.timeZone });
    return site;
  });
}

/** Creates a payload (audited as payload.create, in the same transaction). */
export async function createPayload(db: DbLike, input: z.input<typeof payloadInputSchema>, actor: Actor = SETUP_ACTOR) {
  const data = payloadInputSchema.parse(input);
  return inTransaction(db, async (tx) => {
    const payload = await tx.payload.create({ data });
    await auditCreate(tx, actor, payload.schoolId, "payload", payload.id, { name: payload.name });
    return payload;
  });
}

/** Creates a sensor and, with a payload, its first mount (audited as sensor.create, in the same transaction). */
export async function createSensor(db: DbLike, input: z.input<typeof sensorInputSchema>, actor: Actor = SETUP_ACTOR) {
  const { payloadId, mountedFromUtc, mountedToUtc, ...data } = sensorInputSchema.parse(input);
  return inTransaction(db, async (tx) => {
    if (payloadId) {
      const payload = await tx.payload.findUnique({ where: { id: payloadId }, select: { schoolId: true } });
      if (payload?.schoolId !== data.schoolId) throw new z.ZodError([{ code: "custom", path: ["payloadId"], message: "That payload does not belong to this school", input: payloadId }]);
    }
    const sensor = await tx.sensor.create({ data });
    let mountId: string | null = null;
    if (payloadId) {
      mountId = (await tx.sensorMount.create({ data: { sensorId: sensor.id, payloadId, fromUtc: mountedFromUtc ?? new Date(0), toUtc: mountedToUtc ?? null } })).id;
    }
    await auditCreate(tx, actor, sensor.schoolId, "sensor", sensor.id, { serial: sensor.serial, kind: sensor.kind, timeConstantS: sensor.timeConstantS, payloadId: payloadId ?? null, mountId });
    return sensor;
  });
}

export class OverlappingCalibrationError extends Error {
  constructor(readonly otherCalibrationId: string, from: Date, to: Date | null) {
    super(`This validity period overlaps calibration ${otherCalibrationId} (valid ${from.toISOString().slice(0, 10)} to ${to ? to.toISOString().slice(0, 10) : "open end"}). Close that one first or choose other dates.`);
    this.name = "OverlappingCalibrationError";
  }
}

async function refuseOverlap(db: DbLike, data: { sensorId: string; validFromUtc: Date; validToUtc: Date | null }, exceptId?: string) {
  const far = new Date(8.64e15);
  const others = await db.calibration.findMany({ where: { sensorId: data.sensorId, ...(exceptId ? { id: { not: exceptId } } : {}) } });
  for (const other of others) {
    const overlaps = data.validFromUtc < (other.validToUtc ?? far) && other.validFromUtc < (data.validToUtc ?? far);
    if (overlaps) throw new OverlappingCalibrationError(other.id, other.validFromUtc, other.validToUtc);
  }
}

/**
 * Creates a calibration; refuses a validity period that overlaps another of the same sensor.
 * Audited as calibration.create in the same transaction.
 */
export async function createCalibration(db: DbLike, input: z.input<typeof calibrationInputSchema>, actor: Actor = SETUP_ACTOR) {
  const data = calibrationInputSchema.parse(input);
  return inTransaction(db, async (tx) => {
    await refuseOverlap(tx, data);
    const calibration = await tx.calibration.create({
      data: {
        sensorId: data.sensorId,
        spec: data.spec as unknown as Prisma.InputJsonValue,
        validFromUtc: data.validFromUtc,
        validToUtc: data.validToUtc,
        method: data.method,
        referenceReadings: (data.referenceReadings ?? undefined) as Prisma.InputJsonValue | undefined,
        notes: data.notes,
      },
      include: { sensor: { select: { schoolId: true } } },
    });
    await auditCreate(tx, actor, calibration.sensor.schoolId, "calibration", calibration.id, {
      sensorId: calibration.sensorId, method: calibration.method,
      validFromUtc: calibration.validFromUtc.toISOString(), validToUtc: calibration.validToUtc?.toISOString() ?? null,
    });
    const { sensor: _sensor, ...row } = calibration;
    return row;
  });
}

/** Creates a logger layout (audited as layout.create, in the same transaction). */
export async function createLayout(db: DbLike, input: z.input<typeof layoutInputSchema>, actor: Actor = SETUP_ACTOR) {
  const data = layoutInputSchema.parse(input);
  return inTransaction(db, async (tx) => {
    const layout = await tx.loggerLayout.create({ data: { schoolId: data.schoolId, name: data.spec.name, spec: data.spec as unknown as Prisma.InputJsonValue } });
    await auditCreate(tx, actor, layout.schoolId, "layout", layout.id, { name: layout.name });
    return layout;
  });
}

/**
 * Corrects a calibration in place (coefficients, validity, notes). Runs made with the old values keep
 * their own copy of the spec, so history is not lost; reprocessing applies the new values.
 */
export async function updateCalibration(db: DbLike, calibrationId: string, input: z.input<typeof calibrationInputSchema>) {
  const data = calibrationInputSchema.parse(input);
  await refuseOverlap(db, data, calibrationId);
  return db.calibration.update({
    where: { id: calibrationId },
    data: {
      spec: data.spec as unknown as Prisma.InputJsonValue,
      validFromUtc: data.validFromUtc,
      validToUtc: data.validToUtc,
      method: data.method,
      referenceReadings: (data.referenceReadings ?? undefined) as Prisma.InputJsonValue | undefined,
      notes: data.notes,
    },
  });
}
