import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { acceptInvitation, AccountError, changePassword, createApiToken, createInvitation, createUser, revokeApiToken, setMembershipRole, signIn, signOut, viewerFromSession } from "../../lib/auth/accounts.ts";
import { can, refusalStatus, type Action } from "../../lib/auth/permissions.ts";
import { resolveViewer } from "../../lib/auth/resolve-viewer.ts";
import { flightVisibilityWhere, type Role, type Viewer } from "../../lib/auth/visibility.ts";
import { deleteFlight, editFlight, restoreFlight } from "../../lib/ingest/flight-admin.ts";
import { createSensor, ingestFlightFile } from "../../lib/ingest/index.ts";
import { PermissionError } from "../../lib/auth/permissions.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

const member = (schoolId: string, role: Role, isProgramAdmin = false): Viewer => ({ kind: "member", userId: `u-${role}`, isProgramAdmin, schoolIds: [schoolId], memberships: [{ schoolId, role }] });

// The designed matrix (issue: accounts and roles). Rows: viewer; columns: action × own/other school.
// "own" targets a program-visible flight or setup item of school A; "other" of school B.
type Cell = [Action, "own" | "other", boolean];
const MATRIX: Array<{ who: string; viewer: Viewer; cells: Cell[] }> = [
  { who: "anonymous", viewer: { kind: "anonymous" }, cells: [
    ["flight.read", "own", false], ["flight.upload", "own", false], ["flight.edit", "own", false], ["flight.delete", "own", false],
    ["flight.restore", "own", false], ["setup.edit", "own", false], ["members.manage", "own", false], ["audit.read", "own", false], ["program.settings", "own", false],
  ] },
  { who: "reader", viewer: member("A", "reader"), cells: [
    ["flight.read", "own", true], ["flight.read", "other", true], ["flight.upload", "own", false], ["flight.edit", "own", false], ["flight.delete", "own", false],
    ["flight.restore", "own", false], ["setup.edit", "own", false], ["members.manage", "own", false], ["audit.read", "own", false], ["program.settings", "own", false],
  ] },
  { who: "contributor", viewer: member("A", "contributor"), cells: [
    ["flight.read", "own", true], ["flight.upload", "own", true], ["flight.upload", "other", false], ["flight.edit", "own", true], ["flight.edit", "other", false],
    ["flight.delete", "own", true], ["flight.delete", "other", false], ["flight.restore", "own", false], ["setup.edit", "own", true], ["setup.edit", "other", false],
    ["members.manage", "own", false], ["audit.read", "own", false], ["program.settings", "own", false],
  ] },
  { who: "school admin", viewer: member("A", "school-admin"), cells: [
    ["flight.upload", "own", true], ["flight.upload", "other", false], ["flight.edit", "other", false], ["flight.delete", "other", false],
    ["flight.restore", "own", true], ["flight.restore", "other", false], ["setup.edit", "own", true], ["setup.edit", "other", false],
    ["members.manage", "own", true], ["members.manage", "other", false], ["audit.read", "own", true], ["audit.read", "other", false], ["program.settings", "own", false],
  ] },
  { who: "program admin", viewer: member("A", "reader", true), cells: [
    ["flight.upload", "other", true], ["flight.edit", "other", true], ["flight.delete", "other", true], ["flight.restore", "other", true],
    ["setup.edit", "other", true], ["members.manage", "other", true], ["audit.read", "other", true], ["program.settings", "own", true],
  ] },
];

describe("permission matrix (role × action × own/other school)", () => {
  const cases = MATRIX.flatMap(({ who, viewer, cells }) => cells.map(([action, whose, allowed]) => ({ who, viewer, action, whose, allowed })));
  test.each(cases)("$who: $action on $whose school → $allowed", ({ viewer, action, whose, allowed }) => {
    expect(can(viewer, action, { schoolId: whose === "own" ? "A" : "B", visibility: "program" })).toBe(allowed);
  });

  test("school-only flights of another school are invisible; public ones visible to everybody", () => {
    expect(can(member("A", "reader"), "flight.read", { schoolId: "B", visibility: "school" })).toBe(false);
    expect(can(member("A", "reader"), "flight.read", { schoolId: "A", visibility: "school" })).toBe(true);
    expect(can({ kind: "anonymous" }, "flight.read", { schoolId: "B", visibility: "public" })).toBe(true);
    expect(can({ kind: "anonymous" }, "flight.read", { schoolId: "B", visibility: "program" })).toBe(false);
  });

  test("refusals are 401 for visitors and 403 for signed-in people", () => {
    expect(refusalStatus({ kind: "anonymous" })).toBe(401);
    expect(refusalStatus(member("A", "reader"))).toBe(403);
  });

  test("a token is limited to its scopes", () => {
    const readOnly: Viewer = { ...(member("A", "contributor") as Extract<Viewer, { kind: "member" }>), tokenScopes: ["read"] };
    expect(can(readOnly, "flight.read", { schoolId: "A", visibility: "school" })).toBe(true);
    expect(can(readOnly, "flight.upload", { schoolId: "A" })).toBe(false);
    expect(can(readOnly, "flight.edit", { schoolId: "A" })).toBe(false);
  });
});

describe.each(testEngines())("accounts, tokens and visibility on %s", (engine) => {
  let database: TestDatabase;
  let a: Awaited<ReturnType<typeof setUpSchool>>;
  let b: Awaited<ReturnType<typeof setUpSchool>>;
  let privateFlightB = "";
  let programFlightB = "";
  const password = "correct horse battery";

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    a = await setUpSchool(database.db, "School Alpha");
    b = await setUpSchool(database.db, "School Beta");
    const upload = async (ids: typeof a, seed: number, visibility: string) =>
      (await ingestFlightFile(database.db, { file: { name: `f${seed}.csv`, bytes: makeFlightFile({ seed }).bytes }, metadata: { schoolId: ids.school.id, siteId: ids.site.id, layoutId: ids.layout.id, sensorId: ids.sensor.id, launchAtUtc: "2024-07-10T06:01:00Z", visibility } })).flightId;
    privateFlightB = await upload(b, 31, "school");
    programFlightB = await upload(b, 32, "program");
  });
  afterAll(async () => database?.drop());

  test("with no account the install is local; the first account becomes program admin", async () => {
    expect((await resolveViewer(database.db, {})).viewer?.kind).toBe("local");
    const first = await createUser(database.db, { email: "Admin@Example.org", password, displayName: "Admin" });
    expect(first.isProgramAdmin).toBe(true);
    expect(first.email).toBe("admin@example.org");
    const second = await createUser(database.db, { email: "alice@example.org", password, displayName: "Alice" });
    expect(second.isProgramAdmin).toBe(false);
    expect((await resolveViewer(database.db, {})).viewer?.kind).toBe("anonymous");
    await expect(createUser(database.db, { email: "alice@example.org", password, displayName: "Again" })).rejects.toBeInstanceOf(AccountError);
  });

  test("sign in, session, password change, sign out; secrets never stored in clear", async () => {
    const session = await signIn(database.db, { email: "alice@example.org", password }, "127.0.0.1");
    const viewer = await viewerFromSession(database.db, session.sessionSecret);
    expect(viewer?.kind).toBe("member");
    const stored = await database.db.session.findMany();
    expect(stored.some((s) => s.id === session.sessionSecret)).toBe(false);
    const user = await database.db.user.findUniqueOrThrow({ where: { email: "alice@example.org" } });
    expect(user.passwordHash.startsWith("$argon2id$")).toBe(true);
    expect(user.passwordHash).not.toContain(password);
    await changePassword(database.db, user.id, password, "an even better passphrase");
    await expect(signIn(database.db, { email: "alice@example.org", password }, "127.0.0.1")).rejects.toMatchObject({ code: "bad-credentials" });
    await signOut(database.db, session.sessionSecret);
    expect(await viewerFromSession(database.db, session.sessionSecret)).toBeNull();
    await changePassword(database.db, user.id, "an even better passphrase", password);
  });

  test("login is rate-limited per account (in the database, shared by every process)", async () => {
    await createUser(database.db, { email: "mallory-target@example.org", password, displayName: "Target" });
    for (let i = 0; i < 5; i++) {
      await expect(signIn(database.db, { email: "mallory-target@example.org", password: "wrong wrong" }, `10.0.0.${i}`)).rejects.toMatchObject({ code: "bad-credentials" });
    }
    await expect(signIn(database.db, { email: "mallory-target@example.org", password }, "10.0.0.99")).rejects.toMatchObject({ code: "rate-limited" });
  });

  test("login is rate-limited per address", async () => {
    for (let i = 0; i < 20; i++) {
      await expect(signIn(database.db, { email: `nobody${i}@example.org`, password: "wrong wrong" }, "192.0.2.7")).rejects.toMatchObject({ code: "bad-credentials" });
    }
    await expect(signIn(database.db, { email: "alice@example.org", password }, "192.0.2.7")).rejects.toMatchObject({ code: "rate-limited" });
  });

  test("invitation links join a school once and expire", async () => {
    const alice = await database.db.user.findUniqueOrThrow({ where: { email: "alice@example.org" } });
    const invitation = await createInvitation(database.db, { schoolId: a.school.id, role: "contributor", createdById: null });
    expect(await acceptInvitation(database.db, invitation.secret, alice.id)).toEqual({ schoolId: a.school.id, role: "contributor" });
    await expect(acceptInvitation(database.db, invitation.secret, alice.id)).rejects.toMatchObject({ code: "invalid-invitation" });
    const expired = await createInvitation(database.db, { schoolId: a.school.id, role: "reader", createdById: null });
    await database.db.invitation.update({ where: { id: expired.id }, data: { expiresAt: new Date(Date.now() - 1000) } });
    await expect(acceptInvitation(database.db, expired.secret, alice.id)).rejects.toMatchObject({ code: "invalid-invitation" });
  });

  test("a school A token cannot read school B's private flights nor upload to B; revoked tokens stop at once", async () => {
    const alice = await database.db.user.findUniqueOrThrow({ where: { email: "alice@example.org" } });
    const { id, token } = await createApiToken(database.db, { userId: alice.id, schoolId: a.school.id, name: "laptop", scopes: ["read", "upload"] });
    expect((await database.db.apiToken.findUniqueOrThrow({ where: { id } })).tokenHash).not.toContain(token);
    const resolved = await resolveViewer(database.db, { authorization: `Bearer ${token}` });
    const viewer = resolved.viewer!;
    const visible = await database.db.flight.findMany({ where: flightVisibilityWhere(viewer), select: { id: true } });
    expect(visible.map((f) => f.id)).toContain(programFlightB);
    expect(visible.map((f) => f.id)).not.toContain(privateFlightB);
    expect(can(viewer, "flight.upload", { schoolId: b.school.id })).toBe(false);
    expect(can(viewer, "flight.upload", { schoolId: a.school.id })).toBe(true);
    expect((await database.db.apiToken.findUniqueOrThrow({ where: { id } })).lastUsedAt).not.toBeNull();
    await revokeApiToken(database.db, id, alice.id);
    expect(await resolveViewer(database.db, { authorization: `Bearer ${token}` })).toEqual({ viewer: null, error: "invalid-token" });
  });

  test("a person in no school reads like a visitor; an upload-only token reads only public flights", async () => {
    const loner = await createUser(database.db, { email: "loner@example.org", password, displayName: "Loner" });
    const session = await signIn(database.db, { email: "loner@example.org", password }, "127.0.0.9");
    const lonerViewer = (await viewerFromSession(database.db, session.sessionSecret))!;
    expect(await database.db.flight.count({ where: { AND: [{ id: programFlightB }, flightVisibilityWhere(lonerViewer)] } })).toBe(0);
    const alice = await database.db.user.findUniqueOrThrow({ where: { email: "alice@example.org" } });
    const { token } = await createApiToken(database.db, { userId: alice.id, schoolId: a.school.id, name: "upload only", scopes: ["upload"] });
    const uploader = (await resolveViewer(database.db, { authorization: `Bearer ${token}` })).viewer!;
    expect(await database.db.flight.count({ where: { AND: [{ id: programFlightB }, flightVisibilityWhere(uploader)] } })).toBe(0);
    expect(can(uploader, "flight.upload", { schoolId: a.school.id })).toBe(true);
    expect(loner.isProgramAdmin).toBe(false);
  });

  test("an upload cannot borrow another school's sensor or payload", async () => {
    const meta = { schoolId: a.school.id, siteId: a.site.id, layoutId: a.layout.id, launchAtUtc: "2024-07-12T06:01:00Z" };
    const file = { name: "borrow.csv", bytes: makeFlightFile({ seed: 33 }).bytes };
    await expect(ingestFlightFile(database.db, { file, metadata: { ...meta, sensorId: b.sensor.id } })).rejects.toMatchObject({ code: "unknown-reference" });
    await expect(ingestFlightFile(database.db, { file, metadata: { ...meta, sensorId: a.sensor.id, payloadId: b.payload.id } })).rejects.toMatchObject({ code: "unknown-reference" });
    await expect(ingestFlightFile(database.db, { file, metadata: { ...meta, sensorId: b.sensor.id, calibrationId: a.calibration.id } })).rejects.toMatchObject({ code: "unknown-reference" });
    await expect(createSensor(database.db, { schoolId: a.school.id, serial: "X-9", kind: "test", payloadId: b.payload.id })).rejects.toThrow(/does not belong/);
  });

  test("a program admin's token acts for its one school only", async () => {
    const admin = await database.db.user.findUniqueOrThrow({ where: { email: "admin@example.org" } });
    const { token } = await createApiToken(database.db, { userId: admin.id, schoolId: a.school.id, name: "admin upload", scopes: ["upload"] });
    const viewer = (await resolveViewer(database.db, { authorization: `Bearer ${token}` })).viewer!;
    expect(can(viewer, "flight.upload", { schoolId: a.school.id })).toBe(true);
    expect(can(viewer, "flight.upload", { schoolId: b.school.id })).toBe(false);
    expect(can(viewer, "program.settings", { schoolId: null })).toBe(false);
  });

  test("edits, visibility changes and soft deletes are checked and audited; an admin restores", async () => {
    const alice = await database.db.user.findUniqueOrThrow({ where: { email: "alice@example.org" } });
    const session = await signIn(database.db, { email: "alice@example.org", password }, "127.0.0.2");
    const aliceViewer = (await viewerFromSession(database.db, session.sessionSecret))!;
    // Alice contributes to A, not B.
    await expect(editFlight(database.db, aliceViewer, programFlightB, { title: "hijacked" })).rejects.toBeInstanceOf(PermissionError);
    await expect(deleteFlight(database.db, aliceViewer, programFlightB)).rejects.toMatchObject({ status: 403 });
    await setMembershipRole(database.db, { userId: alice.id, schoolId: b.school.id, role: "contributor", byUserId: null });
    const aliceInB = (await viewerFromSession(database.db, session.sessionSecret))!;
    await editFlight(database.db, aliceInB, programFlightB, { visibility: "public", title: "<script>alert(1)</script>" });
    await deleteFlight(database.db, aliceInB, programFlightB);
    expect(await database.db.flight.count({ where: { AND: [{ id: programFlightB }, flightVisibilityWhere(aliceInB)] } })).toBe(0);
    await expect(restoreFlight(database.db, aliceInB, programFlightB)).rejects.toMatchObject({ status: 403 });
    const admin = await database.db.user.findUniqueOrThrow({ where: { email: "admin@example.org" } });
    const adminViewer: Viewer = { kind: "member", userId: admin.id, isProgramAdmin: true, schoolIds: [], memberships: [] };
    await restoreFlight(database.db, adminViewer, programFlightB);
    const actions = (await database.db.auditEvent.findMany({ where: { entityId: programFlightB }, orderBy: { at: "asc" } })).map((e) => e.action);
    expect(actions).toEqual(expect.arrayContaining(["flight.upload", "flight.visibility", "flight.delete", "flight.restore"]));
    const audit = JSON.stringify(await database.db.auditEvent.findMany());
    expect(audit).not.toContain(password);
  });
});
