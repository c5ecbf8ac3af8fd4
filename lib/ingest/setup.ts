import { z } from "zod";
import type { Db, DbTransaction } from "../db/index.ts";
import { Prisma } from "../db/index.ts";
import { isValidTimeZone } from "../analysis/launch-time.ts";
import { loggerLayoutSpecSchema } from "./layout.ts";
import { storableDateInputSchema, temperatureCalibrationSchema } from "./schemas.ts";

type DbLike = Db | DbTransaction;

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

export async function createSchool(db: DbLike, input: z.input<typeof schoolInputSchema>) {
  const data = schoolInputSchema.parse(input);
  return db.school.create({ data: { name: data.name, slug: data.slug ?? slugify(data.name) } });
}

export async function createSite(db: DbLike, input: z.input<typeof siteInputSchema>) {
  return db.site.create({ data: siteInputSchema.parse(input) });
}

export async function createPayload(db: DbLike, input: z.input<typeof payloadInputSchema>) {
  return db.payload.create({ data: payloadInputSchema.parse(input) });
}

export async function createSensor(db: DbLike, input: z.input<typeof sensorInputSchema>) {
  const { payloadId, mountedFromUtc, mountedToUtc, ...data } = sensorInputSchema.parse(input);
  if (payloadId) {
    const payload = await db.payload.findUnique({ where: { id: payloadId }, select: { schoolId: true } });
    if (payload?.schoolId !== data.schoolId) throw new z.ZodError([{ code: "custom", path: ["payloadId"], message: "That payload does not belong to this school", input: payloadId }]);
  }
  const sensor = await db.sensor.create({ data });
  if (payloadId) {
    await db.sensorMount.create({ data: { sensorId: sensor.id, payloadId, fromUtc: mountedFromUtc ?? new Date(0), toUtc: mountedToUtc ?? null } });
  }
  return sensor;
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

/** Creates a calibration; refuses a validity period that overlaps another of the same sensor. */
export async function createCalibration(db: DbLike, input: z.input<typeof calibrationInputSchema>) {
  const data = calibrationInputSchema.parse(input);
  await refuseOverlap(db, data);
  return db.calibration.create({
    data: {
      sensorId: data.sensorId,
      spec: data.spec as unknown as Prisma.InputJsonValue,
      validFromUtc: data.validFromUtc,
      validToUtc: data.validToUtc,
      method: data.method,
      referenceReadings: (data.referenceReadings ?? undefined) as Prisma.InputJsonValue | undefined,
      notes: data.notes,
    },
  });
}

export async function createLayout(db: DbLike, input: z.input<typeof layoutInputSchema>) {
  const data = layoutInputSchema.parse(input);
  return db.loggerLayout.create({ data: { schoolId: data.schoolId, name: data.spec.name, spec: data.spec as unknown as Prisma.InputJsonValue } });
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
