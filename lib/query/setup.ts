import "server-only";
import { getDb, type Db } from "../db/index.ts";

/** Everything the upload form offers to choose from, per school. */
export async function getUploadChoices(db: Db = getDb()) {
  const [schools, sites, layouts, payloads, sensors] = await Promise.all([
    db.school.findMany({ orderBy: { name: "asc" }, select: { id: true, name: true } }),
    db.site.findMany({ orderBy: { name: "asc" }, select: { id: true, schoolId: true, name: true, latitudeDeg: true, longitudeDeg: true, elevationM: true, timeZone: true } }),
    db.loggerLayout.findMany({ orderBy: { name: "asc" }, select: { id: true, schoolId: true, name: true, spec: true } }),
    db.payload.findMany({ orderBy: { name: "asc" }, select: { id: true, schoolId: true, name: true } }),
    db.sensor.findMany({
      orderBy: { serial: "asc" },
      select: {
        id: true, schoolId: true, serial: true, kind: true, timeConstantS: true,
        calibrations: { orderBy: { validFromUtc: "desc" }, select: { id: true, method: true, validFromUtc: true, validToUtc: true, spec: true } },
      },
    }),
  ]);
  return {
    schools,
    sites,
    layouts,
    payloads,
    sensors: sensors.map((s) => ({
      ...s,
      calibrations: s.calibrations.map((c) => ({ ...c, validFromUtc: c.validFromUtc.toISOString(), validToUtc: c.validToUtc?.toISOString() ?? null })),
    })),
  };
}

export type UploadChoices = Awaited<ReturnType<typeof getUploadChoices>>;

export async function listSchoolsAndSites(db: Db = getDb()) {
  const [schools, sites] = await Promise.all([
    db.school.findMany({ orderBy: { name: "asc" }, select: { id: true, name: true } }),
    db.site.findMany({ orderBy: { name: "asc" }, select: { id: true, name: true, schoolId: true, latitudeDeg: true } }),
  ]);
  return { schools, sites };
}
