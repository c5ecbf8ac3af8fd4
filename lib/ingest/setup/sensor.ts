/** Sensors and their mounts in payloads: schemas, audited create, correction and mount. */
import { z } from "zod";
import type { Actor } from "../store.ts";
import { audit, auditCreate, inTransaction, SETUP_ACTOR, SetupConflictError, type DbLike } from "./common.ts";
import { storableDateInputSchema } from "../schemas.ts";

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

export const sensorUpdateSchema = sensorInputSchema.pick({ serial: true, kind: true, timeConstantS: true, notes: true });

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

/** Changes a sensor's description (serial, kind, time constant, notes); mounts and calibrations stay. */
export async function updateSensor(db: DbLike, sensorId: string, input: z.input<typeof sensorUpdateSchema>, actor: Actor = SETUP_ACTOR) {
  const data = sensorUpdateSchema.parse(input);
  const sensor = await db.sensor.update({ where: { id: sensorId }, data });
  await audit(db, actor, sensor.schoolId, "sensor.update", "sensor", sensor.id, data);
  return sensor;
}

export const sensorMountInputSchema = z
  .object({
    sensorId: z.string().min(1),
    payloadId: z.string().min(1, "Choose a payload"),
    fromUtc: storableDateInputSchema({ error: "Give the date the sensor went into the payload" }),
    toUtc: storableDateInputSchema().nullable().default(null),
  })
  .refine((m) => !m.toUtc || m.toUtc > m.fromUtc, { path: ["toUtc"], message: "The end of the mount must be after its start" });

const FAR_FUTURE = new Date(8.64e15);
const isoDay = (d: Date | null) => (d ? d.toISOString().slice(0, 10) : "open end");

/**
 * Records that a sensor sits in a payload from `fromUtc` (to `toUtc`, or open). A sensor is in one
 * payload at a time: an open mount that began earlier is closed at `fromUtc` (the sensor was moved);
 * any other overlap is refused with a message naming the clashing mount.
 */
export async function mountSensor(db: DbLike, input: z.input<typeof sensorMountInputSchema>, actor: Actor = SETUP_ACTOR) {
  const data = sensorMountInputSchema.parse(input);
  const [sensor, payload] = await Promise.all([
    db.sensor.findUnique({ where: { id: data.sensorId } }),
    db.payload.findUnique({ where: { id: data.payloadId } }),
  ]);
  if (!sensor) throw new SetupConflictError("That sensor does not exist", "sensorId");
  if (!payload || payload.schoolId !== sensor.schoolId) throw new SetupConflictError("That payload does not belong to the sensor's school", "payloadId");
  const mounts = await db.sensorMount.findMany({ where: { sensorId: sensor.id }, include: { payload: { select: { name: true } } }, orderBy: { fromUtc: "asc" } });
  const open = mounts.find((m) => m.toUtc === null && m.fromUtc < data.fromUtc);
  for (const mount of mounts) {
    // The open mount that began earlier ends where the new one starts (the sensor was moved).
    const end = mount === open ? data.fromUtc : (mount.toUtc ?? FAR_FUTURE);
    if (data.fromUtc < end && mount.fromUtc < (data.toUtc ?? FAR_FUTURE)) {
      throw new SetupConflictError(
        `Sensor ${sensor.serial} is already in payload ${mount.payload.name} from ${isoDay(mount.fromUtc)} to ${isoDay(mount.toUtc)}; a sensor sits in one payload at a time. End that mount first or choose other dates.`,
        "fromUtc",
      );
    }
  }
  if (open) await db.sensorMount.update({ where: { id: open.id }, data: { toUtc: data.fromUtc } });
  const mount = await db.sensorMount.create({ data: { sensorId: sensor.id, payloadId: payload.id, fromUtc: data.fromUtc, toUtc: data.toUtc } });
  await audit(db, actor, sensor.schoolId, "sensor.mount", "sensor", sensor.id, { mountId: mount.id, payloadId: payload.id, fromUtc: data.fromUtc.toISOString(), toUtc: data.toUtc?.toISOString() ?? null, closedMountId: open?.id ?? null });
  return mount;
}
