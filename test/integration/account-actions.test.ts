import { afterAll, beforeAll, describe, expect, test, vi } from "vitest";
import { addMembership, createApiToken, createUser, SESSION_COOKIE, signIn, viewerFromSession } from "../../lib/auth/accounts.ts";
import { parseTrustedProxy, PEER_ADDRESS_HEADER, type TrustedProxy } from "../../lib/auth/trusted-proxy.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, type TestDatabase } from "../support/test-databases.ts";

// Outside a request there are no headers or cookies: the test sets what the request would carry.
const request = vi.hoisted(() => ({
  headers: new Headers(),
  cookies: new Map<string, string>(),
  env: {} as { LAPSEBANK_PUBLIC_URL?: string; LAPSEBANK_TRUSTED_PROXY?: TrustedProxy },
}));
vi.mock("next/headers", () => ({
  headers: async () => request.headers,
  cookies: async () => ({
    get: (name: string) => (request.cookies.has(name) ? { name, value: request.cookies.get(name) } : undefined),
    set: (name: string, value: string) => void request.cookies.set(name, value),
    delete: (name: string) => void request.cookies.delete(name),
  }),
}));
vi.mock("next/cache", () => ({ revalidatePath: vi.fn() }));
// redirect() ends the action by throwing; the test reads where it was sent.
class Redirected extends Error {
  constructor(readonly url: string) {
    super(`redirect ${url}`);
  }
}
vi.mock("next/navigation", () => ({ redirect: (url: string) => { throw new Redirected(url); }, notFound: () => { throw new Error("not found"); } }));
vi.mock("@/lib/env", async (importOriginal) => {
  const actual = await importOriginal<typeof import("../../lib/env.ts")>();
  return { ...actual, getEnv: () => ({ ...actual.getEnv(), ...request.env }) };
});

const password = "correct horse battery";

async function redirectOf(run: Promise<unknown>): Promise<string> {
  const error = await run.then(() => null, (e: unknown) => e);
  if (error instanceof Redirected) return error.url;
  throw new Error(`expected a redirect, got ${error instanceof Error ? `${error.name}: ${error.message}` : "no error"}`);
}

function form(fields: Record<string, string>): FormData {
  const data = new FormData();
  for (const [key, value] of Object.entries(fields)) data.set(key, value);
  return data;
}

// The actions and route handlers use the app's database handle (DATABASE_URL), so this file runs on
// SQLite, pointing DATABASE_URL at its own fresh database before the first call.
describe("account actions, client address and public URLs (SQLite)", () => {
  let database: TestDatabase;
  let school: Awaited<ReturnType<typeof setUpSchool>>;
  let actions: typeof import("../../app/account/actions.ts");
  let viewerModule: typeof import("../../app/_lib/viewer.ts");
  let flightsRoute: typeof import("../../app/api/v1/flights/route.ts");

  beforeAll(async () => {
    database = await createTestDatabase("sqlite");
    process.env.DATABASE_URL = database.url;
    const { getDbHandle } = await import("../../lib/db/index.ts");
    expect(getDbHandle().url).toBe(database.url);
    school = await setUpSchool(database.db, "Action School");
    actions = await import("../../app/account/actions.ts");
    viewerModule = await import("../../app/_lib/viewer.ts");
    flightsRoute = await import("../../app/api/v1/flights/route.ts");
  });
  afterAll(async () => {
    const { getDbHandle } = await import("../../lib/db/index.ts");
    await getDbHandle().db.$disconnect();
    await database?.drop();
  });

  const uploadForm = (seed: number) => {
    const file = makeFlightFile({ seed });
    const data = form({ schoolId: school.school.id, siteId: school.site.id, layoutId: school.layout.id, sensorId: school.sensor.id, launchAtUtc: file.launchAtUtc.toISOString() });
    data.set("file", new Blob([file.bytes]), `f${seed}.csv`);
    return data;
  };

  test("API URLs and Location say the public origin, not the app's own localhost:<port>", async () => {
    // Local mode (no account yet): anybody may upload.
    request.env = { LAPSEBANK_PUBLIC_URL: "https://archive.example.org", LAPSEBANK_TRUSTED_PROXY: parseTrustedProxy(undefined) };
    request.headers = new Headers({ [PEER_ADDRESS_HEADER]: "127.0.0.1" });
    const created = await flightsRoute.POST(new Request("http://localhost:3000/api/v1/flights", { method: "POST", body: uploadForm(61) }));
    expect(created.status).toBe(201);
    // Issue 13: before, http://localhost:3000/api/v1/flights/…
    expect(created.headers.get("location")).toMatch(/^https:\/\/archive\.example\.org\/api\/v1\/flights\/[^/]+$/);
    expect((await created.json()).flight.url).toMatch(/^https:\/\/archive\.example\.org\/flights\//);

    // No public URL configured: the host and protocol a trusted proxy forwarded.
    request.env = { LAPSEBANK_TRUSTED_PROXY: parseTrustedProxy("10.0.0.0/8") };
    request.headers = new Headers({ [PEER_ADDRESS_HEADER]: "10.0.0.2", "x-forwarded-host": "balloons.example.net", "x-forwarded-proto": "https" });
    const listed = await flightsRoute.GET(new Request("http://localhost:3000/api/v1/flights", { headers: request.headers }));
    const body = (await listed.json()) as { flights: Array<{ url: string; apiUrl: string }> };
    expect(body.flights[0]?.apiUrl).toMatch(/^https:\/\/balloons\.example\.net\/api\/v1\/flights\//);

    // The same headers from a peer that is not the proxy are not believed.
    const forged = new Headers({ [PEER_ADDRESS_HEADER]: "192.0.2.1", "x-forwarded-host": "evil.example", "x-forwarded-proto": "https" });
    request.headers = forged;
    const direct = (await (await flightsRoute.GET(new Request("http://localhost:3000/api/v1/flights", { headers: forged }))).json()) as typeof body;
    expect(direct.flights[0]?.apiUrl).toMatch(/^http:\/\/localhost:3000\/api\/v1\/flights\//);
  });

  test("the client address is the socket's unless a trusted proxy is configured", async () => {
    request.env = { LAPSEBANK_TRUSTED_PROXY: parseTrustedProxy(undefined) };
    const seen = new Set<string>();
    for (let i = 0; i < 5; i++) {
      request.headers = new Headers({ [PEER_ADDRESS_HEADER]: "192.0.2.44", "x-forwarded-for": `203.0.113.${i}` });
      seen.add(await viewerModule.getClientAddress());
    }
    // Issue 13: before, each forged X-Forwarded-For was taken as the client.
    expect([...seen]).toEqual(["192.0.2.44"]);
    request.env = { LAPSEBANK_TRUSTED_PROXY: parseTrustedProxy("1") };
    request.headers = new Headers({ [PEER_ADDRESS_HEADER]: "10.0.0.2", "x-forwarded-for": "203.0.113.7" });
    expect(await viewerModule.getClientAddress()).toBe("203.0.113.7");
    request.env = {};
  });

  test("revoking another person's token is a form error, not a server error", async () => {
    request.headers = new Headers({ [PEER_ADDRESS_HEADER]: "127.0.0.1" });
    const owner = await createUser(database.db, { email: "owner@example.org", password, displayName: "Owner" });
    const other = await createUser(database.db, { email: "other@example.org", password, displayName: "Other" });
    await addMembership(database.db, { userId: owner.id, schoolId: school.school.id, role: "school-admin", byUserId: null });
    await addMembership(database.db, { userId: other.id, schoolId: school.school.id, role: "reader", byUserId: null });
    const token = await createApiToken(database.db, { userId: other.id, schoolId: school.school.id, name: "other's", scopes: ["read"] });
    const session = await signIn(database.db, { email: "owner@example.org", password }, "127.0.0.1");
    request.cookies = new Map([[SESSION_COOKIE, session.sessionSecret]]);
    // Issue 13: before, the AccountError escaped the action (a 500 page).
    expect(await redirectOf(actions.revokeTokenAction(form({ tokenId: token.id })))).toBe("/account?error=token-not-found");
    expect(await redirectOf(actions.revokeTokenAction(form({ tokenId: "no-such-token" })))).toBe("/account?error=token-not-found");
    expect((await database.db.apiToken.findUniqueOrThrow({ where: { id: token.id } })).revokedAt).toBeNull();
  });

  test("role changes: an unknown role or user, or a non-member, is a form error and changes nothing", async () => {
    const other = await database.db.user.findUniqueOrThrow({ where: { email: "other@example.org" } });
    const outsider = await createUser(database.db, { email: "outsider@example.org", password, displayName: "Outsider" });
    const page = `/schools/${school.school.id}/members`;
    // Issue 13: before, zod's parse error and the foreign-key error escaped (500), and the outsider became a member.
    expect(await redirectOf(actions.setRoleAction(form({ schoolId: school.school.id, userId: other.id, role: "overlord" })))).toBe(`${page}?error=unknown-role`);
    expect(await redirectOf(actions.setRoleAction(form({ schoolId: school.school.id, userId: "no-such-user", role: "reader" })))).toBe(`${page}?error=not-a-member`);
    expect(await redirectOf(actions.setRoleAction(form({ schoolId: school.school.id, userId: outsider.id, role: "school-admin" })))).toBe(`${page}?error=not-a-member`);
    expect(await database.db.membership.count({ where: { userId: outsider.id } })).toBe(0);
    await actions.setRoleAction(form({ schoolId: school.school.id, userId: other.id, role: "contributor" }));
    expect((await database.db.membership.findFirstOrThrow({ where: { userId: other.id } })).role).toBe("contributor");
  });

  test("changing the password from the account page keeps this session and ends the others", async () => {
    const here = request.cookies.get(SESSION_COOKIE)!;
    const elsewhere = await signIn(database.db, { email: "owner@example.org", password }, "127.0.0.9");
    const result = await actions.changePasswordAction(null, form({ currentPassword: password, newPassword: "another fine passphrase" }));
    expect(result).toMatchObject({ ok: true });
    expect((await viewerFromSession(database.db, here))?.kind).toBe("member");
    expect(await viewerFromSession(database.db, elsewhere.sessionSecret)).toBeNull();
  });

  test("invitation links are absolute; invitation-only refuses plain sign-up and admits through a link", async () => {
    request.env = { LAPSEBANK_PUBLIC_URL: "https://archive.example.org", LAPSEBANK_TRUSTED_PROXY: parseTrustedProxy(undefined) };
    request.headers = new Headers({ [PEER_ADDRESS_HEADER]: "127.0.0.1", host: "localhost:3000" });
    // The owner (the first account here: program admin, and this school's admin) is still signed in.
    const made = await actions.createInvitationAction(null, form({ schoolId: school.school.id, role: "reader" }));
    // Issue 16: before, the link was the bare path /invite/<secret>.
    expect(made?.secret).toMatch(/^https:\/\/archive\.example\.org\/invite\/[A-Za-z0-9_-]+$/);
    const secret = new URL(made?.secret ?? "").pathname.split("/").at(-1) ?? "";

    const setup = await import("../../app/setup/actions.ts");
    expect(await setup.saveInvitationOnly({ invitationOnly: true })).toMatchObject({ ok: true, data: { invitationOnly: true } });
    const ownerCookie = request.cookies.get(SESSION_COOKIE)!;

    // A visitor without a link is refused with a message saying why.
    request.cookies = new Map();
    const refused = await actions.signUpAction(null, form({ email: "walk-in@example.org", password, displayName: "Walk-in" }));
    expect(refused).toMatchObject({ ok: false });
    expect(refused?.message).toMatch(/invitation only/);
    expect(await database.db.user.count({ where: { email: "walk-in@example.org" } })).toBe(0);
    // A visitor cannot change the rule.
    expect(await setup.saveInvitationOnly({ invitationOnly: false })).toMatchObject({ ok: false });

    // Through the link: the account is made and joins the school.
    expect(await redirectOf(actions.signUpAction(null, form({ email: "reader@example.org", password, displayName: "Reader", invitation: secret, next: `/invite/${secret}` })))).toBe("/account?joined=1");
    const reader = await database.db.user.findUniqueOrThrow({ where: { email: "reader@example.org" } });
    expect((await database.db.membership.findFirstOrThrow({ where: { userId: reader.id } })).role).toBe("reader");

    request.cookies = new Map([[SESSION_COOKIE, ownerCookie]]);
    expect(await setup.saveInvitationOnly({ invitationOnly: false })).toMatchObject({ ok: true, data: { invitationOnly: false } });
    request.env = {};
  });

  test("the invitation page names school and role, and shows Accept only while the link is open", async () => {
    request.headers = new Headers({ [PEER_ADDRESS_HEADER]: "127.0.0.1" });
    const { createInvitation } = await import("../../lib/auth/accounts.ts");
    const { renderToStaticMarkup } = await import("react-dom/server");
    const page = (await import("../../app/invite/[secret]/page.tsx")).default;
    const html = async (secret: string) => renderToStaticMarkup(await page({ params: Promise.resolve({ secret }), searchParams: Promise.resolve({}) }));
    const open = await createInvitation(database.db, { schoolId: school.school.id, role: "school-admin", createdById: null });
    const used = await createInvitation(database.db, { schoolId: school.school.id, role: "contributor", createdById: null });
    const expired = await createInvitation(database.db, { schoolId: school.school.id, role: "reader", createdById: null });
    await database.db.invitation.update({ where: { id: used.id }, data: { usedAt: new Date() } });
    await database.db.invitation.update({ where: { id: expired.id }, data: { expiresAt: new Date(Date.now() - 60_000) } });
    // The owner is signed in, so an open link offers Accept.
    const openPage = await html(open.secret);
    // Issue 16: before, the page named neither school nor role and always offered Accept.
    expect(openPage).toContain("Action School");
    expect(openPage).toContain("school admin");
    expect(openPage).toContain("Accept invitation");
    const usedPage = await html(used.secret);
    expect(usedPage).toContain("contributor");
    expect(usedPage).toContain("already used");
    expect(usedPage).not.toContain("Accept invitation");
    const expiredPage = await html(expired.secret);
    expect(expiredPage).toContain("reader");
    expect(expiredPage).toContain("expired");
    expect(expiredPage).not.toContain("Accept invitation");
    expect(await html("no-such-secret")).not.toContain("Accept invitation");
  });
});
