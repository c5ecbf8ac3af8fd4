/**
 * The invented demo program inside a database: how to recognise it and how to take it out again.
 * The demo's schools are recognised by name and slug together (both come from seed/demo-program.ts),
 * its flights by `Flight.synthetic` inside those schools, and its setup (sites, payloads, sensors,
 * calibrations, logger layouts) by the names the generator gives them. Anything a real flight
 * still uses stays, and the report says so.
 */
import { getDb, type Db, type DbTransaction } from "../db/index.ts";
import { requirePermission } from "../auth/permissions.ts";
import type { Viewer } from "../auth/visibility.ts";
import { generateDemoSetup } from "../../seed/demo-program.ts";
import { setupItemUses, type SetupItemKind } from "./setup-more.ts";
import { slugify } from "./setup.ts";
import type { Actor } from "./store.ts";

/** The actor the demo loader writes as; flights it stored carry this label in their flight.upload audit row. */
export const DEMO_ACTOR: Actor = { userId: null, label: "demo loader" };

/** What the demo program creates in one school, by the names the generator gives. */
export interface DemoSchoolIdentity {
  name: string;
  slug: string;
  sites: string[];
  payloads: string[];
  sensors: Array<{ serial: string; calibrations: Array<{ validFromUtc: string; method: string }> }>;
  layouts: string[];
}

/** The demo program's schools and setup names (cheap: no flights are generated). */
export function demoIdentity(): DemoSchoolIdentity[] {
  const setup = generateDemoSetup();
  return setup.schools.map((school) => {
    const payloadKeys = new Set(setup.payloads.filter((p) => p.schoolKey === school.key).map((p) => p.key));
    return {
      name: school.name,
      slug: slugify(school.name),
      sites: setup.sites.filter((s) => s.schoolKey === school.key).map((s) => s.name),
      payloads: setup.payloads.filter((p) => p.schoolKey === school.key).map((p) => p.name),
      sensors: setup.sensors
        .filter((s) => payloadKeys.has(s.payloadKey))
        .map((s) => ({ serial: s.serial, calibrations: s.calibrations.map((c) => ({ validFromUtc: c.validFromUtc, method: c.method })) })),
      // The loader creates every layout in every school whose flights use it; the names say which.
      layouts: setup.layouts.map((l) => l.spec.name),
    };
  });
}

type DbLike = Db | DbTransaction;

/** The demo's schools present in the database (name and slug both match), with what the demo made in each. */
export async function findDemoSchools(db: DbLike): Promise<Array<{ id: string; identity: DemoSchoolIdentity }>> {
  const identities = demoIdentity();
  const rows = await db.school.findMany({ where: { OR: identities.map((i) => ({ name: i.name, slug: i.slug })) }, select: { id: true, name: true, slug: true } });
  return rows.flatMap((row) => {
    const identity = identities.find((i) => i.name === row.name && i.slug === row.slug);
    return identity ? [{ id: row.id, identity }] : [];
  });
}

/** How many invented demo flights the database holds (deleted ones included). */
export async function countDemoFlights(db: DbLike): Promise<number> {
  const schools = await findDemoSchools(db);
  if (schools.length === 0) return 0;
  return db.flight.count({ where: { schoolId: { in: schools.map((s) => s.id) }, synthetic: true } });
}

export interface KeptDemoItem {
  kind: SetupItemKind | "school";
  id: string;
  name: string;
  /** Why it stays, in words ("used by 1 flight"). */
  reason: string;
}

export interface DemoRemovalReport {
  flights: number;
  schools: number;
  sites: number;
  payloads: number;
  sensors: number;
  calibrations: number;
  layouts: number;
  /** Demo setup that real data still uses: kept. */
  kept: KeptDemoItem[];
}

const CHUNK = 200;

const SCHOOL_CONTENT_WORDS = {
  sites: ["site", "sites"], payloads: ["payload", "payloads"], sensors: ["sensor", "sensors"], layouts: ["logger layout", "logger layouts"],
  flights: ["flight", "flights"], rawFiles: ["raw file", "raw files"], memberships: ["member", "members"], invitations: ["invitation", "invitations"],
  apiTokens: ["API token", "API tokens"],
} as const;

function countWords(n: number, what: keyof typeof SCHOOL_CONTENT_WORDS): string {
  const [one, many] = SCHOOL_CONTENT_WORDS[what];
  return `${n} ${n === 1 ? one : many}`;
}

function chunks<T>(items: readonly T[]): T[][] {
  const out: T[][] = [];
  for (let i = 0; i < items.length; i += CHUNK) out.push(items.slice(i, i + CHUNK));
  return out;
}

/**
 * Deletes exactly the demo: its invented flights (with their runs, levels, layers, summaries and raw
 * files) and then the demo setup nothing else uses any more, in one transaction, with one
 * demo.remove audit row. A site, payload, sensor, calibration or layout a real flight or run still
 * uses is kept (and so is its school), as is a school with members, invitations, tokens or setup of
 * its own; the report lists each kept item and why. Running it again finds nothing more to delete.
 * Only a program admin (or the local install, as the CLI runs) may do it: the permission is
 * "program.settings" of lib/auth/permissions.ts.
 * @throws PermissionError (401/403) for anyone else; nothing is deleted then.
 */
export async function removeDemoProgram(db: Db, viewer: Viewer, actor: Actor): Promise<DemoRemovalReport> {
  requirePermission(viewer, "program.settings", { schoolId: null });
  return db.$transaction(async (tx) => {
    const report: DemoRemovalReport = { flights: 0, schools: 0, sites: 0, payloads: 0, sensors: 0, calibrations: 0, layouts: 0, kept: [] };
    const schools = await findDemoSchools(tx);
    const schoolIds = schools.map((s) => s.id);
    const flights = schoolIds.length ? await tx.flight.findMany({ where: { schoolId: { in: schoolIds }, synthetic: true }, select: { id: true, rawFileId: true } }) : [];
    for (const part of chunks(flights)) {
      const ids = part.map((f) => f.id);
      await tx.flightSummary.deleteMany({ where: { flightId: { in: ids } } });
      await tx.analysisRun.deleteMany({ where: { flightId: { in: ids } } });
      await tx.flight.deleteMany({ where: { id: { in: ids } } });
      await tx.rawFile.deleteMany({ where: { id: { in: part.map((f) => f.rawFileId) } } });
    }
    report.flights = flights.length;

    const keep = async (kind: SetupItemKind, id: string, name: string): Promise<boolean> => {
      const uses = await setupItemUses(tx, kind, id);
      if (uses.length) report.kept.push({ kind, id, name, reason: `used by ${uses.join(" and ")}` });
      return uses.length > 0;
    };
    for (const { id: schoolId, identity } of schools) {
      for (const site of await tx.site.findMany({ where: { schoolId, name: { in: identity.sites } }, select: { id: true, name: true } })) {
        if (await keep("site", site.id, site.name)) continue;
        await tx.site.delete({ where: { id: site.id } });
        report.sites++;
      }
      for (const layout of await tx.loggerLayout.findMany({ where: { schoolId, name: { in: identity.layouts } }, select: { id: true, name: true } })) {
        if (await keep("layout", layout.id, layout.name)) continue;
        await tx.loggerLayout.delete({ where: { id: layout.id } });
        report.layouts++;
      }
      const sensors = await tx.sensor.findMany({ where: { schoolId, serial: { in: identity.sensors.map((s) => s.serial) } }, select: { id: true, serial: true } });
      for (const sensor of sensors) {
        const demoCalibrations = identity.sensors.find((s) => s.serial === sensor.serial)?.calibrations ?? [];
        const calibrations = await tx.calibration.findMany({ where: { sensorId: sensor.id }, select: { id: true, validFromUtc: true, method: true } });
        const isDemo = (c: { validFromUtc: Date; method: string }) => demoCalibrations.some((d) => new Date(d.validFromUtc).getTime() === c.validFromUtc.getTime() && d.method === c.method);
        const own = calibrations.filter(isDemo);
        const foreign = calibrations.length - own.length;
        if (foreign === 0 && !(await keep("sensor", sensor.id, sensor.serial))) {
          await tx.sensor.delete({ where: { id: sensor.id } }); // its calibrations and mounts go with it
          report.sensors++;
          report.calibrations += own.length;
          continue;
        }
        if (foreign > 0) report.kept.push({ kind: "sensor", id: sensor.id, name: sensor.serial, reason: `has ${foreign} calibration${foreign === 1 ? "" : "s"} the demo did not make` });
        for (const calibration of own) {
          if (await keep("calibration", calibration.id, `${calibration.id} (sensor ${sensor.serial})`)) continue;
          await tx.calibration.delete({ where: { id: calibration.id } });
          report.calibrations++;
        }
      }
      for (const payload of await tx.payload.findMany({ where: { schoolId, name: { in: identity.payloads } }, select: { id: true, name: true } })) {
        if (await keep("payload", payload.id, payload.name)) continue;
        await tx.payload.delete({ where: { id: payload.id } });
        report.payloads++;
      }
      const left = await tx.school.findUniqueOrThrow({
        where: { id: schoolId },
        select: { name: true, _count: { select: { sites: true, payloads: true, sensors: true, layouts: true, flights: true, rawFiles: true, memberships: true, invitations: true, apiTokens: true } } },
      });
      const remaining = Object.entries(left._count).filter(([, n]) => n > 0).map(([what, n]) => countWords(n, what as keyof typeof SCHOOL_CONTENT_WORDS));
      if (remaining.length) {
        report.kept.push({ kind: "school", id: schoolId, name: left.name, reason: `still has ${remaining.join(", ")}` });
        continue;
      }
      await tx.school.delete({ where: { id: schoolId } });
      report.schools++;
    }
    const { kept, ...counts } = report;
    await tx.auditEvent.create({
      data: {
        actorUserId: actor.userId, actorLabel: actor.label, schoolId: null, action: "demo.remove", entityType: "program", entityId: "demo",
        details: { ...counts, kept: kept.map((k) => ({ kind: k.kind, id: k.id, name: k.name, reason: k.reason })) },
      },
    });
    return report;
  }, { timeout: 600_000, maxWait: 60_000 });
}

/** Whether the invented demo program is in the database, for the Setup page's removal control. */
export async function getDemoPresence(db: Db = getDb()): Promise<{ schools: number; flights: number }> {
  const [schools, flights] = await Promise.all([findDemoSchools(db), countDemoFlights(db)]);
  return { schools: schools.length, flights };
}
