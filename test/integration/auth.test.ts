import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { acceptInvitation, AccountError, addMembership, changePassword, createApiToken, createInvitation, createUser, revokeApiToken, setMembershipRole, signIn, signOut, viewerFromSession } from "../../lib/auth/accounts.ts";
import { auditSchoolIds, can, refusalStatus, type Action } from "../../lib/auth/permissions.ts";
import { ACCOUNT_RULE, ADDRESS_RULE, delayAfterFailuresMs } from "../../lib/auth/login-throttle.ts";
import { clientAddress, forwardingHeaders, parseTrustedProxy, PEER_ADDRESS_HEADER } from "../../lib/auth/trusted-proxy.ts";
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

  /** Outcome counts of sign-ins: "bad-credentials" means the password was checked. */
  const outcomes = async (tries: Array<Promise<unknown>>) => {
    const settled = await Promise.allSettled(tries);
    const codes = settled.map((r) => (r.status === "rejected" ? (r.reason as AccountError).code ?? String(r.reason) : "signed-in"));
    return { checked: codes.filter((c) => c === "bad-credentials").length, limited: codes.filter((c) => c === "rate-limited").length, other: codes.filter((c) => c !== "bad-credentials" && c !== "rate-limited") };
  };
  /** The wait is over: what the clock would do after `nextCheckAt`. */
  const endWait = async (key: string) => {
    await database.db.loginThrottle.update({ where: { key }, data: { nextCheckAt: new Date(Date.now() - 1) } });
  };

  test("30 concurrent wrong passwords for one account: at most 5 are checked (counted atomically in the database)", async () => {
    await createUser(database.db, { email: "burst-target@example.org", password, displayName: "Burst" });
    // Issue 13: before, all 30 read "0 failures" before any was written and 17 were checked.
    const result = await outcomes(Array.from({ length: 30 }, (_, i) => signIn(database.db, { email: "burst-target@example.org", password: "wrong wrong" }, `198.51.100.${i}`)));
    expect(result.other).toEqual([]);
    expect(result.checked).toBeLessThanOrEqual(ACCOUNT_RULE.freeFailures);
    expect(result.checked + result.limited).toBe(30);
  });

  test("the owner is slowed, not locked out: after 5 wrong tries the right password works once the wait is over", async () => {
    await createUser(database.db, { email: "mallory-target@example.org", password, displayName: "Target" });
    for (let i = 0; i < 5; i++) {
      await expect(signIn(database.db, { email: "mallory-target@example.org", password: "wrong wrong" }, `10.0.0.${i}`)).rejects.toMatchObject({ code: "bad-credentials" });
    }
    // The wait after the 5th failure is 15 s [D: ACCOUNT_RULE], far below the old 15-minute lockout.
    const refused = await signIn(database.db, { email: "mallory-target@example.org", password }, "10.0.0.99").catch((e: unknown) => e);
    expect(refused).toMatchObject({ code: "rate-limited" });
    expect((refused as AccountError).retryAfterS).toBeLessThanOrEqual(15);
    await endWait("account:mallory-target@example.org");
    const session = await signIn(database.db, { email: "mallory-target@example.org", password }, "10.0.0.99");
    expect((await viewerFromSession(database.db, session.sessionSecret))?.kind).toBe("member");
    // Rows nobody touched for a day are pruned by the next successful sign-in.
    await database.db.loginThrottle.create({ data: { key: "account:long-ago@example.org", failures: 3, updatedAt: new Date(Date.now() - 2 * 86_400_000), nextCheckAt: new Date(Date.now() - 2 * 86_400_000) } });
    await signIn(database.db, { email: "mallory-target@example.org", password }, "10.0.0.99");
    expect(await database.db.loginThrottle.count({ where: { key: "account:long-ago@example.org" } })).toBe(0);
    // Signing in clears the count: the next mistake is checked at once.
    await expect(signIn(database.db, { email: "mallory-target@example.org", password: "wrong wrong" }, "10.0.0.99")).rejects.toMatchObject({ code: "bad-credentials" });
  });

  test("guessing from elsewhere does not make the owner wait at an address they signed in from before", async () => {
    const owner = await createUser(database.db, { email: "usual-place@example.org", password, displayName: "Usual" });
    await signIn(database.db, { email: "usual-place@example.org", password }, "198.18.0.1");
    for (let i = 0; i < 8; i++) {
      await signIn(database.db, { email: "usual-place@example.org", password: "wrong wrong" }, `203.0.113.${100 + i}`).catch(() => undefined);
    }
    await expect(signIn(database.db, { email: "usual-place@example.org", password }, "203.0.113.200")).rejects.toMatchObject({ code: "rate-limited" });
    expect((await signIn(database.db, { email: "usual-place@example.org", password }, "198.18.0.1")).userId).toBe(owner.id);
    // Wrong tries at the usual address are limited there too.
    const atHome = await outcomes(Array.from({ length: 10 }, () => signIn(database.db, { email: "usual-place@example.org", password: "wrong wrong" }, "198.18.0.1")));
    expect(atHome.checked).toBeLessThanOrEqual(ACCOUNT_RULE.freeFailures);
  });

  test("the wait doubles after each further failure, up to 5 minutes", () => {
    expect([4, 5, 6, 7, 8, 9, 10, 50].map((n) => delayAfterFailuresMs(ACCOUNT_RULE, n) / 1000)).toEqual([0, 15, 30, 60, 120, 240, 300, 300]); // [D] 15 s × 2^(n−5), cap 300 s
    expect(delayAfterFailuresMs(ADDRESS_RULE, 19)).toBe(0);
  });

  test("per address: 20 failures on other emails slow that address down, but lock nobody out", async () => {
    const admin = await database.db.user.findUniqueOrThrow({ where: { email: "admin@example.org" } });
    // The admin signed in from the shared address before (a school's one public address).
    await signIn(database.db, { email: "admin@example.org", password }, "192.0.2.7");
    const sprayed = await outcomes(Array.from({ length: 30 }, (_, i) => signIn(database.db, { email: `nobody${i}@example.org`, password: "wrong wrong" }, "192.0.2.7")));
    expect(sprayed.other).toEqual([]);
    expect(sprayed.checked).toBeLessThanOrEqual(ADDRESS_RULE.freeFailures);
    // Rule: from another address the admin is not affected at all.
    expect((await signIn(database.db, { email: "admin@example.org", password }, "203.0.113.5")).userId).toBe(admin.id);
    // Rule: from the same address, a person who signed in from it before is exempt from its limit.
    expect((await signIn(database.db, { email: "admin@example.org", password }, "192.0.2.7")).userId).toBe(admin.id);
    // Someone who never signed in from there waits like the guesser (slowed, until the wait ends).
    await expect(signIn(database.db, { email: "alice@example.org", password }, "192.0.2.7")).rejects.toMatchObject({ code: "rate-limited" });
    await endWait("address:192.0.2.7");
    await signIn(database.db, { email: "alice@example.org", password }, "192.0.2.7");
  });

  test("rotating X-Forwarded-For: without a trusted proxy every try counts against the socket address", async () => {
    const proxy = parseTrustedProxy(undefined);
    const addresses = Array.from({ length: 50 }, (_, i) => clientAddress(forwardingHeaders(new Headers({ [PEER_ADDRESS_HEADER]: "::ffff:192.0.2.50", "x-forwarded-for": `203.0.113.${i}` })), proxy));
    expect(new Set(addresses)).toEqual(new Set(["192.0.2.50"]));
    // Issue 13: before, each forged header was a fresh address and 50 of 50 were checked.
    const result = await outcomes(addresses.map((address, i) => signIn(database.db, { email: `rotator${i}@example.org`, password: "wrong wrong" }, address)));
    expect(result.checked).toBeLessThanOrEqual(ADDRESS_RULE.freeFailures);
    expect(result.checked + result.limited).toBe(50);
  });

  test("with a trusted proxy configured, the address it forwarded is used (hop count or address list)", async () => {
    const viaProxy = (forwardedFor: string) => forwardingHeaders(new Headers({ [PEER_ADDRESS_HEADER]: "10.1.2.3", "x-forwarded-for": forwardedFor }));
    expect(clientAddress(viaProxy("198.51.100.9"), parseTrustedProxy("1"))).toBe("198.51.100.9");
    // A client-written entry to the left of the real one is ignored.
    expect(clientAddress(viaProxy("6.6.6.6, 198.51.100.9"), parseTrustedProxy("1"))).toBe("198.51.100.9");
    expect(clientAddress(viaProxy("6.6.6.6, 198.51.100.9, 10.9.0.1"), parseTrustedProxy("2"))).toBe("198.51.100.9");
    expect(clientAddress(viaProxy("6.6.6.6, 198.51.100.9"), parseTrustedProxy("10.0.0.0/8"))).toBe("198.51.100.9");
    expect(clientAddress(viaProxy("6.6.6.6, 198.51.100.9, 10.9.0.1"), parseTrustedProxy("10.1.2.3, 10.9.0.0/16"))).toBe("198.51.100.9");
    // The peer is not a listed proxy: its forwarded header is not believed.
    expect(clientAddress(viaProxy("198.51.100.9"), parseTrustedProxy("10.200.0.1"))).toBe("10.1.2.3");
    expect(() => parseTrustedProxy("proxy.example")).toThrow(/neither a hop count/);
    // Distinct real clients behind the proxy are limited separately.
    const proxy = parseTrustedProxy("10.0.0.0/8");
    for (let i = 0; i < 3; i++) {
      await expect(signIn(database.db, { email: "nobody-behind@example.org", password: "wrong wrong" }, clientAddress(viaProxy("198.51.100.77"), proxy))).rejects.toMatchObject({ code: "bad-credentials" });
    }
    expect((await database.db.loginThrottle.findUniqueOrThrow({ where: { key: "address:198.51.100.77" } })).failures).toBe(3);
    expect(await database.db.loginThrottle.count({ where: { key: "address:10.1.2.3" } })).toBe(0);
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

  test("an invitation only ever raises a role: a school admin opening a reader link stays school admin", async () => {
    const head = await createUser(database.db, { email: "head@example.org", password, displayName: "Head" });
    await addMembership(database.db, { userId: head.id, schoolId: a.school.id, role: "school-admin", byUserId: null });
    const reader = await createInvitation(database.db, { schoolId: a.school.id, role: "reader", createdById: null });
    // Issue 13: before, the upsert demoted the admin to reader.
    expect(await acceptInvitation(database.db, reader.secret, head.id)).toEqual({ schoolId: a.school.id, role: "school-admin" });
    expect((await database.db.membership.findFirstOrThrow({ where: { userId: head.id, schoolId: a.school.id } })).role).toBe("school-admin");
    expect((await database.db.invitation.findUniqueOrThrow({ where: { id: reader.id } })).usedAt).not.toBeNull();
    const contributor = await createUser(database.db, { email: "riser@example.org", password, displayName: "Riser" });
    await addMembership(database.db, { userId: contributor.id, schoolId: a.school.id, role: "reader", byUserId: null });
    const raise = await createInvitation(database.db, { schoolId: a.school.id, role: "contributor", createdById: null });
    expect((await acceptInvitation(database.db, raise.secret, contributor.id)).role).toBe("contributor");
  });

  test("role changes apply to existing members only: nobody is added by id without an invitation", async () => {
    const outsider = await createUser(database.db, { email: "outsider@example.org", password, displayName: "Outsider" });
    const head = await database.db.user.findUniqueOrThrow({ where: { email: "head@example.org" } });
    // Issue 13: before, the upsert created a school-admin membership for anybody's id.
    await expect(setMembershipRole(database.db, { userId: outsider.id, schoolId: a.school.id, role: "school-admin", byUserId: head.id })).rejects.toMatchObject({ code: "not-found" });
    await expect(setMembershipRole(database.db, { userId: "no-such-user", schoolId: a.school.id, role: "reader", byUserId: head.id })).rejects.toMatchObject({ code: "not-found" });
    await expect(setMembershipRole(database.db, { userId: outsider.id, schoolId: a.school.id, role: null, byUserId: head.id })).rejects.toMatchObject({ code: "not-found" });
    expect(await database.db.membership.count({ where: { userId: outsider.id } })).toBe(0);
    const riser = await database.db.user.findUniqueOrThrow({ where: { email: "riser@example.org" } });
    await setMembershipRole(database.db, { userId: riser.id, schoolId: a.school.id, role: "reader", byUserId: head.id });
    expect((await database.db.membership.findFirstOrThrow({ where: { userId: riser.id, schoolId: a.school.id } })).role).toBe("reader");
    await expect(addMembership(database.db, { userId: riser.id, schoolId: a.school.id, role: "reader", byUserId: null })).rejects.toMatchObject({ code: "already-member" });
  });

  test("changing the password signs out every other session and keeps the current one", async () => {
    const user = await createUser(database.db, { email: "rotate@example.org", password, displayName: "Rotate" });
    const here = await signIn(database.db, { email: "rotate@example.org", password }, "127.0.0.3");
    const laptop = await signIn(database.db, { email: "rotate@example.org", password }, "127.0.0.4");
    const stolen = await signIn(database.db, { email: "rotate@example.org", password }, "127.0.0.5");
    const result = await changePassword(database.db, user.id, password, "a brand new passphrase", { keepSessionSecret: here.sessionSecret });
    expect(result.sessionsEnded).toBe(2);
    expect((await viewerFromSession(database.db, here.sessionSecret))?.kind).toBe("member");
    // Issue 13: before, both other sessions stayed signed in.
    expect(await viewerFromSession(database.db, laptop.sessionSecret)).toBeNull();
    expect(await viewerFromSession(database.db, stolen.sessionSecret)).toBeNull();
  });

  test("an upload-only token of a school admin opens neither the audit log nor the account page", async () => {
    const head = await database.db.user.findUniqueOrThrow({ where: { email: "head@example.org" } });
    const session = await signIn(database.db, { email: "head@example.org", password }, "127.0.0.6");
    const signedIn = (await viewerFromSession(database.db, session.sessionSecret))!;
    expect(auditSchoolIds(signedIn)).toEqual([a.school.id]);
    expect(can(signedIn, "account.manage", { schoolId: null })).toBe(true);
    const { token } = await createApiToken(database.db, { userId: head.id, schoolId: a.school.id, name: "uploader", scopes: ["upload"] });
    const uploader = (await resolveViewer(database.db, { authorization: `Bearer ${token}` })).viewer!;
    // Issue 13: before, the audit page listed school A's events and deleted flights for this token.
    expect(auditSchoolIds(uploader)).toEqual([]);
    expect(can(uploader, "account.manage", { schoolId: null })).toBe(false);
    expect(can(uploader, "members.manage", { schoolId: a.school.id })).toBe(false);
    expect(can(uploader, "flight.upload", { schoolId: a.school.id })).toBe(true);
    const admin = await database.db.user.findUniqueOrThrow({ where: { email: "admin@example.org" } });
    const adminToken = await createApiToken(database.db, { userId: admin.id, schoolId: a.school.id, name: "admin reader", scopes: ["read", "upload"] });
    const adminViaToken = (await resolveViewer(database.db, { authorization: `Bearer ${adminToken.token}` })).viewer!;
    expect(auditSchoolIds(adminViaToken)).toEqual([]);
    expect(auditSchoolIds({ kind: "local" })).toBeNull();
    expect(auditSchoolIds({ kind: "member", userId: admin.id, isProgramAdmin: true, schoolIds: [], memberships: [] })).toBeNull();
  });

  test("revoking someone else's token is refused and changes nothing", async () => {
    const head = await database.db.user.findUniqueOrThrow({ where: { email: "head@example.org" } });
    const alice = await database.db.user.findUniqueOrThrow({ where: { email: "alice@example.org" } });
    const { id } = await createApiToken(database.db, { userId: alice.id, schoolId: a.school.id, name: "alice's", scopes: ["read"] });
    await expect(revokeApiToken(database.db, id, head.id)).rejects.toMatchObject({ code: "not-found" });
    expect((await database.db.apiToken.findUniqueOrThrow({ where: { id } })).revokedAt).toBeNull();
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
    await addMembership(database.db, { userId: alice.id, schoolId: b.school.id, role: "contributor", byUserId: null });
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
