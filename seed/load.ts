import type { Db, DbHandle } from "../lib/db/index.ts";
import { DEMO_ACTOR } from "../lib/ingest/demo-data.ts";
import { createCalibration, createLayout, createPayload, createSchool, createSensor, createSite, ingestFlightFile, IngestFailure } from "../lib/ingest/index.ts";
import { DEFAULT_DEMO_SEED, generateDemoProgram, type DemoProgram } from "./demo-program.ts";

export interface DemoLoadReport {
  schools: number;
  sites: number;
  flights: number;
  failures: Array<{ fileName: string; message: string }>;
}

/**
 * Loads the invented demo program into an empty database through the real setup writers and
 * the real ingest pipeline (the same code path as an upload). Every flight is stored as invented
 * (`synthetic`); `removeDemoProgram` (lib/ingest/demo-data.ts) takes it all out again.
 * `onProgress` is called per flight.
 */
export async function loadDemoProgram(
  db: Db,
  options: { seed?: number; program?: DemoProgram; onProgress?: (done: number, total: number, fileName: string) => void } = {},
): Promise<DemoLoadReport> {
  const program = options.program ?? generateDemoProgram(options.seed ?? DEFAULT_DEMO_SEED);
  const schoolIds = new Map<string, string>();
  for (const school of program.schools) schoolIds.set(school.key, (await createSchool(db, { name: school.name }, DEMO_ACTOR)).id);
  const id = (map: Map<string, string>, key: string, what: string) => {
    const value = map.get(key);
    if (!value) throw new Error(`Demo program refers to unknown ${what} "${key}"`);
    return value;
  };

  const siteIds = new Map<string, string>();
  for (const site of program.sites) {
    const { key, schoolKey, ...rest } = site;
    siteIds.set(key, (await createSite(db, { ...rest, schoolId: id(schoolIds, schoolKey, "school") }, DEMO_ACTOR)).id);
  }
  const payloadIds = new Map<string, string>();
  const payloadSchool = new Map<string, string>();
  for (const payload of program.payloads) {
    const schoolId = id(schoolIds, payload.schoolKey, "school");
    payloadIds.set(payload.key, (await createPayload(db, { schoolId, name: payload.name }, DEMO_ACTOR)).id);
    payloadSchool.set(payload.key, schoolId);
  }
  const sensorIds = new Map<string, string>();
  for (const sensor of program.sensors) {
    const schoolId = id(payloadSchool, sensor.payloadKey, "payload");
    const created = await createSensor(db, {
      schoolId, serial: sensor.serial, kind: sensor.kind, timeConstantS: sensor.timeConstantS,
      payloadId: id(payloadIds, sensor.payloadKey, "payload"),
      mountedFromUtc: sensor.mountedFromUtc, mountedToUtc: sensor.mountedToUtc,
    }, DEMO_ACTOR);
    sensorIds.set(sensor.key, created.id);
    for (const calibration of sensor.calibrations) {
      await createCalibration(db, { sensorId: created.id, ...calibration }, DEMO_ACTOR);
    }
  }
  // Layouts belong to a school: create each one for every school whose flights use it.
  const layoutIds = new Map<string, string>();
  for (const flight of program.flights) {
    const mapKey = `${flight.schoolKey}/${flight.layoutKey}`;
    if (layoutIds.has(mapKey)) continue;
    const layout = program.layouts.find((l) => l.key === flight.layoutKey);
    if (!layout) throw new Error(`Demo flight ${flight.key} uses unknown layout ${flight.layoutKey}`);
    layoutIds.set(mapKey, (await createLayout(db, { schoolId: id(schoolIds, flight.schoolKey, "school"), spec: layout.spec }, DEMO_ACTOR)).id);
  }

  const failures: DemoLoadReport["failures"] = [];
  let done = 0;
  for (const flight of program.flights) {
    try {
      await ingestFlightFile(db, {
        file: { name: flight.fileName, bytes: flight.content },
        metadata: {
          schoolId: id(schoolIds, flight.schoolKey, "school"),
          siteId: id(siteIds, flight.siteKey, "site"),
          layoutId: id(layoutIds, `${flight.schoolKey}/${flight.layoutKey}`, "layout"),
          payloadId: id(payloadIds, flight.payloadKey, "payload"),
          sensorId: id(sensorIds, flight.sensorKey, "sensor"),
          launchAtUtc: flight.launchAtUtc,
          title: flight.title,
          // Public, so a new visitor meets a working archive; it stays labelled invented everywhere.
          visibility: "public",
          mode: "strict",
        },
        actor: DEMO_ACTOR,
        // Invented data: the archive, flight page, climatology and every export say so.
        synthetic: true,
      });
    } catch (error) {
      failures.push({ fileName: flight.fileName, message: error instanceof IngestFailure ? error.message : String(error) });
    }
    done++;
    options.onProgress?.(done, program.flights.length, flight.fileName);
  }
  return { schools: program.schools.length, sites: program.sites.length, flights: done - failures.length, failures };
}

export type DemoAutoload =
  | { loaded: true; report: DemoLoadReport }
  | { loaded: false; reason: "skipped" | "not-sqlite" | "not-empty" };

/**
 * `npm start`'s demo: loaded only into an embedded SQLite database that holds nothing yet (no
 * school, user or flight), so a shared PostgreSQL archive never gets invented flights unasked
 * (there, `npm run lapsebank -- demo` loads them) and real data is never mixed with the demo.
 */
export async function autoloadDemo(
  handle: Pick<DbHandle, "db" | "engine">,
  options: { skip?: boolean; program?: DemoProgram; onProgress?: (done: number, total: number, fileName: string) => void } = {},
): Promise<DemoAutoload> {
  if (options.skip) return { loaded: false, reason: "skipped" };
  if (handle.engine !== "sqlite") return { loaded: false, reason: "not-sqlite" };
  const [schools, users, flights] = await Promise.all([handle.db.school.count(), handle.db.user.count(), handle.db.flight.count()]);
  if (schools + users + flights > 0) return { loaded: false, reason: "not-empty" };
  return { loaded: true, report: await loadDemoProgram(handle.db, { program: options.program, onProgress: options.onProgress }) };
}
