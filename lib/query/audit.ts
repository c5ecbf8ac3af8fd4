import "server-only";
import { getDb, type Db, type Prisma } from "../db/index.ts";
import { AUDIT_PAGE_SIZE, type AuditFilter } from "./audit-params.ts";

/** The actor label the demo loader writes (lib/ingest/demo-data.ts DEMO_ACTOR). */
export const DEMO_ACTOR_LABEL = "demo loader";

/** Kinds of thing an audit row or its details may point at, each resolved by one batched query. */
type RefKind = "user" | "school" | "flight" | "site" | "payload" | "sensor" | "layout" | "api-token";

/** Details keys shown as words; unknown keys are shown as they are. */
const DETAIL_LABELS: Record<string, string> = {
  programAdmin: "Program admin", otherSessionsEnded: "Other sessions ended", scopes: "Scopes", name: "Name",
  role: "Role", invitedRole: "Invited role", runId: "Analysis run", previousRunId: "Previous analysis run",
  reason: "Reason", before: "Before", after: "After", fileName: "File name", sha256: "SHA-256", sizeBytes: "Size (bytes)",
  kept: "Kept", serial: "Serial", kind: "Kind", payloadId: "Payload", siteId: "Site", schoolId: "School",
  sensorId: "Sensor", flightId: "Flight", userId: "Person", title: "Title", method: "Method",
  validFromUtc: "Valid from (UTC)", validToUtc: "Valid to (UTC)", latitudeDeg: "Latitude (°)", longitudeDeg: "Longitude (°)",
  elevationM: "Elevation (m)", timeZone: "Time zone",
};

/** Details keys whose value is the id of a thing we can name. */
const DETAIL_REFS: Record<string, RefKind> = { payloadId: "payload", siteId: "site", schoolId: "school", sensorId: "sensor", flightId: "flight", userId: "user" };

/** Entity types whose entityId names a row of a known kind. */
const ENTITY_REFS: Record<string, RefKind> = { user: "user", school: "school", flight: "flight", site: "site", payload: "payload", sensor: "sensor", layout: "layout", "api-token": "api-token" };

/** Whether entity rows of this type are looked up by name (an unnamed one was removed since). */
export function isNamedEntityType(entityType: string): boolean {
  return entityType in ENTITY_REFS;
}

export interface AuditRef { kind: string; id: string; name: string | null }
export interface AuditDetail { key: string; label: string; text: string }
export interface AuditEventRow {
  type: "event"; id: string; at: string; actor: string; actorUserId: string | null; school: AuditRef | null;
  action: string; entity: AuditRef; details: AuditDetail[];
}
export interface AuditDemoDayRow { type: "demo-day"; day: string; at: string; count: number; actions: string[] }
export type AuditRow = AuditEventRow | AuditDemoDayRow;

export interface AuditLogPage {
  rows: AuditRow[]; page: number; pageCount: number; totalRows: number; eventCount: number; demoEventCount: number;
}

function filterWhere(scope: string[] | null, filter: AuditFilter): Prisma.AuditEventWhereInput {
  const and: Prisma.AuditEventWhereInput[] = [];
  if (scope !== null) and.push({ schoolId: { in: scope } });
  if (filter.school) and.push({ schoolId: filter.school });
  if (filter.person) and.push({ actorUserId: filter.person });
  if (filter.action) and.push({ action: filter.action });
  if (filter.from) and.push({ at: { gte: new Date(`${filter.from}T00:00:00Z`) } });
  if (filter.to) and.push({ at: { lt: new Date(Date.parse(`${filter.to}T00:00:00Z`) + 86_400_000) } });
  return { AND: and };
}

function withDemo(where: Prisma.AuditEventWhereInput, demo: boolean): Prisma.AuditEventWhereInput {
  return { AND: [where, demo ? { actorLabel: DEMO_ACTOR_LABEL } : { NOT: { actorLabel: DEMO_ACTOR_LABEL } }] };
}

/**
 * One page of the audit log, newest first, ids resolved to names. `scope` is auditSchoolIds() of the
 * viewer (null: every school). Unless `filter.demo` is "show", the demo loader's events are folded
 * into one row per UTC day with their count; such a row takes one place on a page like an event.
 */
export async function listAuditLog(scope: string[] | null, filter: AuditFilter, db: Db = getDb(), pageSize = AUDIT_PAGE_SIZE): Promise<AuditLogPage> {
  const where = filterWhere(scope, filter);
  const start = (filter.page - 1) * pageSize;
  if (filter.demo === "show") {
    const [total, events] = await Promise.all([
      db.auditEvent.count({ where }),
      db.auditEvent.findMany({ where, orderBy: [{ at: "desc" }, { id: "desc" }], skip: start, take: pageSize }),
    ]);
    const demoEventCount = await db.auditEvent.count({ where: withDemo(where, true) });
    return { rows: await resolveEvents(events, db), page: filter.page, pageCount: Math.max(1, Math.ceil(total / pageSize)), totalRows: total, eventCount: total - demoEventCount, demoEventCount };
  }
  const otherWhere = withDemo(where, false);
  const [eventCount, demoEvents] = await Promise.all([
    db.auditEvent.count({ where: otherWhere }),
    db.auditEvent.findMany({ where: withDemo(where, true), select: { at: true, action: true }, orderBy: { at: "desc" } }),
  ]);
  const days = new Map<string, AuditDemoDayRow>();
  for (const e of demoEvents) {
    const day = e.at.toISOString().slice(0, 10);
    const row = days.get(day) ?? { type: "demo-day" as const, day, at: e.at.toISOString(), count: 0, actions: [] };
    row.count += 1;
    if (!row.actions.includes(e.action)) row.actions.push(e.action);
    days.set(day, row);
  }
  // A day row sits at its newest event; its place in the merged list is its index plus the other
  // events newer than it.
  const summaries = [...days.values()];
  const newer = await Promise.all(summaries.map((s) => db.auditEvent.count({ where: { AND: [otherWhere, { at: { gt: new Date(s.at) } }] } })));
  const placed = summaries.map((s, i) => ({ row: s, position: i + newer[i]! }));
  const before = placed.filter((p) => p.position < start).length;
  const inPage = placed.filter((p) => p.position >= start && p.position < start + pageSize);
  const events = await db.auditEvent.findMany({ where: otherWhere, orderBy: [{ at: "desc" }, { id: "desc" }], skip: start - before, take: pageSize - inPage.length });
  const resolved = await resolveEvents(events, db);
  const rows: AuditRow[] = [];
  let next = 0;
  for (let position = start; rows.length < resolved.length + inPage.length; position += 1) {
    const summary = inPage.find((p) => p.position === position);
    if (summary) rows.push(summary.row);
    else rows.push(resolved[next++]!);
  }
  const totalRows = eventCount + summaries.length;
  return { rows, page: filter.page, pageCount: Math.max(1, Math.ceil(totalRows / pageSize)), totalRows, eventCount, demoEventCount: demoEvents.length };
}

type StoredEvent = Awaited<ReturnType<Db["auditEvent"]["findMany"]>>[number];

async function resolveEvents(events: StoredEvent[], db: Db): Promise<AuditEventRow[]> {
  const wanted: Record<RefKind, Set<string>> = { user: new Set(), school: new Set(), flight: new Set(), site: new Set(), payload: new Set(), sensor: new Set(), layout: new Set(), "api-token": new Set() };
  for (const e of events) {
    if (e.actorUserId) wanted.user.add(e.actorUserId);
    if (e.schoolId) wanted.school.add(e.schoolId);
    const kind = ENTITY_REFS[e.entityType];
    if (kind) wanted[kind].add(e.entityId);
    if (e.entityType === "membership") {
      const [userId, schoolId] = e.entityId.split(":");
      if (userId) wanted.user.add(userId);
      if (schoolId) wanted.school.add(schoolId);
    }
    if (isRecord(e.details)) {
      for (const [key, value] of Object.entries(e.details)) {
        const ref = DETAIL_REFS[key];
        if (ref && typeof value === "string") wanted[ref].add(value);
      }
    }
  }
  const ids = (kind: RefKind) => ({ id: { in: [...wanted[kind]] } });
  const [users, schools, flights, sites, payloads, sensors, layouts, tokens] = await Promise.all([
    db.user.findMany({ where: ids("user"), select: { id: true, displayName: true, email: true } }),
    db.school.findMany({ where: ids("school"), select: { id: true, name: true } }),
    db.flight.findMany({ where: ids("flight"), select: { id: true, title: true } }),
    db.site.findMany({ where: ids("site"), select: { id: true, name: true } }),
    db.payload.findMany({ where: ids("payload"), select: { id: true, name: true } }),
    db.sensor.findMany({ where: ids("sensor"), select: { id: true, serial: true } }),
    db.loggerLayout.findMany({ where: ids("layout"), select: { id: true, name: true } }),
    db.apiToken.findMany({ where: ids("api-token"), select: { id: true, name: true } }),
  ]);
  const names: Record<RefKind, Map<string, string>> = {
    user: new Map(users.map((u) => [u.id, u.displayName ? `${u.displayName} (${u.email})` : u.email])),
    school: new Map(schools.map((s) => [s.id, s.name])),
    flight: new Map(flights.map((f) => [f.id, f.title])),
    site: new Map(sites.map((s) => [s.id, s.name])),
    payload: new Map(payloads.map((p) => [p.id, p.name])),
    sensor: new Map(sensors.map((s) => [s.id, `sensor ${s.serial}`])),
    layout: new Map(layouts.map((l) => [l.id, l.name])),
    "api-token": new Map(tokens.map((t) => [t.id, t.name])),
  };
  const nameOf = (kind: RefKind, id: string) => names[kind].get(id) ?? null;
  return events.map((e) => {
    const kind = ENTITY_REFS[e.entityType];
    let entityName = kind ? nameOf(kind, e.entityId) : null;
    if (e.entityType === "membership") {
      const [userId = "", schoolId = ""] = e.entityId.split(":");
      entityName = `${nameOf("user", userId) ?? userId} at ${nameOf("school", schoolId) ?? schoolId}`;
    }
    return {
      type: "event" as const, id: e.id, at: e.at.toISOString(),
      actor: (e.actorUserId ? nameOf("user", e.actorUserId) : null) ?? (e.actorLabel || e.actorUserId || "—"),
      actorUserId: e.actorUserId,
      school: e.schoolId ? { kind: "school", id: e.schoolId, name: nameOf("school", e.schoolId) } : null,
      action: e.action,
      entity: { kind: e.entityType, id: e.entityId, name: entityName },
      details: formatDetails(e.details, nameOf),
    };
  });
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === "object" && value !== null && !Array.isArray(value);
}

/** A details value as one line of plain text (nested values as "key: value" pairs, not JSON). */
function valueText(value: unknown): string {
  if (value === null || value === undefined) return "—";
  if (typeof value === "boolean") return value ? "yes" : "no";
  if (typeof value === "string") return value === "" ? "(empty)" : value;
  if (typeof value === "number") return String(value);
  if (Array.isArray(value)) return value.length === 0 ? "none" : value.map(valueText).join("; ");
  if (isRecord(value)) {
    const entries = Object.entries(value);
    return entries.length === 0 ? "none" : entries.map(([k, v]) => `${DETAIL_LABELS[k] ?? k}: ${valueText(v)}`).join(", ");
  }
  return String(value);
}

/**
 * The details JSON as labelled entries, ids of known kinds replaced by their names, sorted by label
 * (PostgreSQL jsonb does not keep key order, so the stored order differs between engines).
 */
export function formatDetails(details: unknown, nameOf: (kind: RefKind, id: string) => string | null = () => null): AuditDetail[] {
  if (details === null || details === undefined) return [];
  if (!isRecord(details)) return [{ key: "value", label: "Value", text: valueText(details) }];
  return Object.entries(details).map(([key, value]) => {
    const ref = DETAIL_REFS[key];
    const named = ref && typeof value === "string" ? nameOf(ref, value) : null;
    return { key, label: DETAIL_LABELS[key] ?? key, text: named ?? valueText(value) };
  }).sort((a, b) => a.label.localeCompare(b.label, "en"));
}

/** Choices for the filter form: schools, people and actions within the viewer's scope. */
export async function auditFilterChoices(scope: string[] | null, db: Db = getDb()) {
  const where: Prisma.AuditEventWhereInput = scope === null ? {} : { schoolId: { in: scope } };
  const [actions, actors, schools] = await Promise.all([
    db.auditEvent.findMany({ where, distinct: ["action"], select: { action: true }, orderBy: { action: "asc" } }),
    db.auditEvent.findMany({ where: { AND: [where, { actorUserId: { not: null } }] }, distinct: ["actorUserId"], select: { actorUserId: true } }),
    db.school.findMany({ where: scope === null ? {} : { id: { in: scope } }, select: { id: true, name: true }, orderBy: { name: "asc" } }),
  ]);
  const people = await db.user.findMany({ where: { id: { in: actors.flatMap((a) => (a.actorUserId ? [a.actorUserId] : [])) } }, select: { id: true, displayName: true, email: true }, orderBy: { email: "asc" } });
  return {
    actions: actions.map((a) => a.action),
    people: people.map((p) => ({ id: p.id, name: p.displayName ? `${p.displayName} (${p.email})` : p.email })),
    schools,
  };
}
