/**
 * The Audit page's query: ids resolved to names, details as labelled entries, filters, paging of
 * 50, the demo loader's events folded into one row per day, and a school admin's scope.
 * All names and rows are invented for the test.
 */
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { auditSchoolIds } from "../../lib/auth/permissions.ts";
import { auditFilterSchema } from "../../lib/query/audit-params.ts";
import { auditFilterChoices, listAuditLog, type AuditEventRow } from "../../lib/query/audit.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

const filter = (input: Record<string, string> = {}) => auditFilterSchema.parse(input);
const eventsOf = (rows: Awaited<ReturnType<typeof listAuditLog>>["rows"]) => rows.filter((r): r is AuditEventRow => r.type === "event");

describe.each(testEngines())("audit log query on %s", (engine) => {
  let database: TestDatabase;
  let ids: { ada: string; ben: string; north: string; south: string; site: string; payload: string };

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    const db = database.db;
    const ada = await db.user.create({ data: { email: "ada@example.invalid", displayName: "Ada Invented", passwordHash: "x" } });
    const ben = await db.user.create({ data: { email: "ben@example.invalid", displayName: "", passwordHash: "x" } });
    const north = await db.school.create({ data: { slug: "north-test", name: "North Test School" } });
    const south = await db.school.create({ data: { slug: "south-test", name: "South Test School" } });
    const site = await db.site.create({ data: { schoolId: north.id, name: "Hill Field", latitudeDeg: 50, longitudeDeg: 8, elevationM: 300, timeZone: "UTC" } });
    const payload = await db.payload.create({ data: { schoolId: north.id, name: "Box One" } });
    ids = { ada: ada.id, ben: ben.id, north: north.id, south: south.id, site: site.id, payload: payload.id };
    // 60 events by Ada at North on 2026-03-01..02, one per 10 minutes from 2026-03-01T00:00Z.
    const t0 = Date.parse("2026-03-01T00:00:00Z");
    await db.auditEvent.createMany({
      data: Array.from({ length: 60 }, (_, i) => ({
        at: new Date(t0 + i * 600_000), actorUserId: ada.id, actorLabel: ada.email, schoolId: north.id,
        action: i === 0 ? "site.create" : "payload.create", entityType: i === 0 ? "site" : "payload", entityId: i === 0 ? site.id : payload.id,
        details: i === 0 ? { name: "Hill Field", elevationM: 300, timeZone: "UTC" } : { name: "Box One", siteId: site.id, flags: { tested: true } },
      })),
    });
    // Ben at South on 2026-03-05.
    await db.auditEvent.create({ data: { at: new Date("2026-03-05T12:00:00Z"), actorUserId: ben.id, actorLabel: ben.email, schoolId: south.id, action: "membership.role", entityType: "membership", entityId: `${ada.id}:${south.id}`, details: { role: "reader" } } });
    // The demo loader: 30 events on 2026-03-03, 20 on 2026-03-04, all at North.
    const demo = (day: string, n: number) => Array.from({ length: n }, (_, i) => ({
      at: new Date(Date.parse(`${day}T08:00:00Z`) + i * 1000), actorUserId: null, actorLabel: "demo loader", schoolId: north.id,
      action: "flight.upload", entityType: "flight", entityId: `demo-${day}-${i}`, details: { fileName: `f${i}.csv` },
    }));
    await db.auditEvent.createMany({ data: [...demo("2026-03-03", 30), ...demo("2026-03-04", 20)] });
  }, 120_000);

  afterAll(async () => {
    await database?.drop();
  });

  test("names replace ids: actor, school, entity, membership and ids inside details; details are labelled entries sorted by label", async () => {
    const { rows } = await listAuditLog(null, filter({ action: "site.create" }), database.db);
    expect(rows).toHaveLength(1);
    const site = rows[0] as AuditEventRow;
    expect(site.actor).toBe("Ada Invented (ada@example.invalid)");
    expect(site.school?.name).toBe("North Test School");
    expect(site.entity).toEqual({ kind: "site", id: ids.site, name: "Hill Field" });
    expect(site.details).toEqual([
      { key: "elevationM", label: "Elevation (m)", text: "300" },
      { key: "name", label: "Name", text: "Hill Field" },
      { key: "timeZone", label: "Time zone", text: "UTC" },
    ]);
    const payload = eventsOf((await listAuditLog(null, filter({ action: "payload.create" }), database.db)).rows)[0]!;
    expect(payload.entity.name).toBe("Box One");
    expect(payload.details).toContainEqual({ key: "siteId", label: "Site", text: "Hill Field" });
    expect(payload.details).toContainEqual({ key: "flags", label: "flags", text: "tested: yes" });
    const membership = eventsOf((await listAuditLog(null, filter({ action: "membership.role" }), database.db)).rows)[0]!;
    expect(membership.actor).toBe("ben@example.invalid");
    expect(membership.entity.name).toBe("Ada Invented (ada@example.invalid) at South Test School");
  });

  test("filters by school, person, action and date range (to is inclusive)", async () => {
    const db = database.db;
    expect((await listAuditLog(null, filter({ school: ids.south }), db)).eventCount).toBe(1);
    expect((await listAuditLog(null, filter({ person: ids.ada }), db)).eventCount).toBe(60);
    expect((await listAuditLog(null, filter({ action: "payload.create" }), db)).eventCount).toBe(59);
    // 2026-03-01 holds the first 144 ten-minute slots, so all 60 of Ada's events.
    const day1 = await listAuditLog(null, filter({ from: "2026-03-01", to: "2026-03-01" }), db);
    expect(day1.eventCount).toBe(60);
    expect(day1.demoEventCount).toBe(0);
    const later = await listAuditLog(null, filter({ from: "2026-03-04" }), db);
    expect(later.eventCount).toBe(1);
    expect(later.demoEventCount).toBe(20);
  });

  test("the filter refuses unknown parameters, bad dates and a reversed range", () => {
    const unknown = auditFilterSchema.safeParse({ user: "x" });
    expect(unknown.success).toBe(false);
    expect(unknown.error?.issues[0]?.message).toMatch(/unknown parameter "user"; the parameters are school, person, action, from, to, demo, page/);
    expect(auditFilterSchema.safeParse({ from: "2026-13-45" }).success).toBe(false);
    expect(auditFilterSchema.safeParse({ from: "yesterday" }).success).toBe(false);
    expect(auditFilterSchema.safeParse({ from: "2026-03-05", to: "2026-03-01" }).success).toBe(false);
    expect(auditFilterSchema.safeParse({ page: "0" }).success).toBe(false);
  });

  test("demo events fold into one row per day, each taking one place on a page of 50", async () => {
    const db = database.db;
    const first = await listAuditLog(null, filter(), db);
    // 61 other events + 2 demo days = 63 rows: page 1 of 2.
    expect(first).toMatchObject({ totalRows: 63, pageCount: 2, eventCount: 61, demoEventCount: 50 });
    expect(first.rows).toHaveLength(50);
    expect(first.rows[0]).toMatchObject({ type: "event", action: "membership.role" });
    expect(first.rows[1]).toMatchObject({ type: "demo-day", day: "2026-03-04", count: 20, actions: ["flight.upload"] });
    expect(first.rows[2]).toMatchObject({ type: "demo-day", day: "2026-03-03", count: 30 });
    const second = await listAuditLog(null, filter({ page: "2" }), db);
    expect(second.rows).toHaveLength(13);
    // Every event appears once across both pages, newest first.
    const all = [...eventsOf(first.rows), ...eventsOf(second.rows)];
    expect(new Set(all.map((e) => e.id)).size).toBe(61);
    const times = all.map((e) => e.at);
    expect([...times].sort().reverse()).toEqual(times);
    expect(second.rows.at(-1)).toMatchObject({ action: "site.create" });
  });

  test("show demo events lists them one by one", async () => {
    const db = database.db;
    const shown = await listAuditLog(null, filter({ demo: "show" }), db);
    expect(shown).toMatchObject({ totalRows: 111, pageCount: 3, eventCount: 61, demoEventCount: 50 });
    expect(shown.rows.every((r) => r.type === "event")).toBe(true);
    expect(shown.rows[1]).toMatchObject({ actor: "demo loader", action: "flight.upload" });
  });

  test("a school admin sees only their school's events and choices", async () => {
    const db = database.db;
    const scope = auditSchoolIds({ kind: "member", userId: ids.ben, isProgramAdmin: false, schoolIds: [ids.south], memberships: [{ schoolId: ids.south, role: "school-admin" }] });
    expect(scope).toEqual([ids.south]);
    const page = await listAuditLog(scope, filter(), db);
    expect(page).toMatchObject({ totalRows: 1, eventCount: 1, demoEventCount: 0 });
    // Asking for another school inside the scope gives nothing, not that school's rows.
    expect((await listAuditLog(scope, filter({ school: ids.north }), db)).totalRows).toBe(0);
    const choices = await auditFilterChoices(scope, db);
    expect(choices.schools.map((s) => s.name)).toEqual(["South Test School"]);
    expect(choices.actions).toEqual(["membership.role"]);
    expect(choices.people.map((p) => p.name)).toEqual(["ben@example.invalid"]);
  });
});
