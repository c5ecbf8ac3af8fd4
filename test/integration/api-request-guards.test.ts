import { afterAll, beforeAll, describe, expect, test, vi } from "vitest";
import { createApiToken, createUser, addMembership, signIn } from "../../lib/auth/accounts.ts";
import { COMMA_COUNTS_LAYOUT } from "../../seed/demo-files.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, type TestDatabase } from "../support/test-databases.ts";

// The route handlers run as Next runs them, with `getViewer()` reading the headers and cookies of
// the request under test (outside Next there is no request scope, so next/headers is pointed at it).
const current = vi.hoisted(() => ({ headers: new Headers() }));
vi.mock("next/headers", () => ({
  headers: async () => current.headers,
  cookies: async () => ({
    get: (name: string) => {
      const pair = (current.headers.get("cookie") ?? "").split(/;\s*/).find((p) => p.startsWith(`${name}=`));
      return pair === undefined ? undefined : { name, value: pair.slice(name.length + 1) };
    },
  }),
}));

const UPLOAD_LIMIT_MB = 2; // small, so the over-limit case stays quick
const UPLOAD_LIMIT_BYTES = UPLOAD_LIMIT_MB * 1024 * 1024;
const MB = 1024 * 1024;
const HOST = "127.0.0.1:3000";
const OWN_ORIGIN = `http://${HOST}`;
const BOUNDARY = "----lapsebank-test-boundary";
const PASSWORD = "a long enough passphrase";

type Handler = (request: Request, context: { params: Promise<Record<string, string>> }) => Promise<Response>;

/** A body that only makes bytes when they are pulled (and counts them): `head`, then filler up to `totalBytes`, never a closing boundary. */
function countingBody(head: Uint8Array, totalBytes: number) {
  const chunk = new Uint8Array(64 * 1024).fill(0x31);
  let pulled = 0;
  const stream = new ReadableStream<Uint8Array>(
    {
      pull(controller) {
        if (pulled >= totalBytes) return controller.close();
        const next = pulled === 0 ? head : chunk.subarray(0, Math.min(chunk.byteLength, totalBytes - pulled));
        pulled += next.byteLength;
        controller.enqueue(next);
      },
    },
    { highWaterMark: 0 },
  );
  return { stream, pulled: () => pulled };
}

function multipartHead(fields: Record<string, string>, fileName: string): Uint8Array {
  const parts = Object.entries(fields).map(([name, value]) => `--${BOUNDARY}\r\nContent-Disposition: form-data; name="${name}"\r\n\r\n${value}\r\n`);
  parts.push(`--${BOUNDARY}\r\nContent-Disposition: form-data; name="file"; filename="${fileName}"\r\nContent-Type: text/csv\r\n\r\n`);
  return new TextEncoder().encode(parts.join(""));
}

/** A complete multipart body: fields first, then the file. */
function multipartBody(fields: Record<string, string>, file: Uint8Array, fileName = "flight.csv"): Uint8Array<ArrayBuffer> {
  const head = multipartHead(fields, fileName);
  const tail = new TextEncoder().encode(`\r\n--${BOUNDARY}--\r\n`);
  const body = new Uint8Array(head.byteLength + file.byteLength + tail.byteLength);
  body.set(head, 0);
  body.set(file, head.byteLength);
  body.set(tail, head.byteLength + file.byteLength);
  return body;
}

/** Request headers a browser tab on `origin` would send, with the session cookie when given. */
function browserHeaders(options: { origin?: string; site?: string; cookie?: string; contentType?: string }): Headers {
  const headers = new Headers({ Host: HOST });
  if (options.origin) headers.set("Origin", options.origin);
  if (options.site) headers.set("Sec-Fetch-Site", options.site);
  if (options.cookie) headers.set("Cookie", options.cookie);
  if (options.contentType) headers.set("Content-Type", options.contentType);
  return headers;
}

async function call(handler: Handler, path: string, init: { method?: string; headers: Headers; body?: BodyInit | ReadableStream<Uint8Array> }, params: Record<string, string> = {}): Promise<Response> {
  const request = new Request(`${OWN_ORIGIN}${path}`, { method: init.method ?? "POST", headers: init.headers, body: init.body, duplex: "half" } as RequestInit);
  current.headers = request.headers;
  return handler(request, { params: Promise.resolve(params) });
}

describe("API request guards (SQLite)", () => {
  let database: TestDatabase;
  let a: Awaited<ReturnType<typeof setUpSchool>>;
  let b: Awaited<ReturnType<typeof setUpSchool>>;
  let flights: { POST: Handler };
  let sites: { POST: Handler };
  let preview: { POST: Handler };
  const siteBody = (name: string) => JSON.stringify({ schoolId: a.school.id, name, latitudeDeg: 48, longitudeDeg: 9, elevationM: 300, timeZone: "Europe/Berlin" });
  const sitesNamed = (name: string) => database.db.site.count({ where: { name } });
  const uploadFields = (school: typeof a, launchAtUtc: string) => ({ schoolId: school.school.id, siteId: school.site.id, layoutId: school.layout.id, sensorId: school.sensor.id, launchAtUtc });

  beforeAll(async () => {
    database = await createTestDatabase("sqlite");
    process.env.DATABASE_URL = database.url;
    process.env.LAPSEBANK_MAX_UPLOAD_MB = String(UPLOAD_LIMIT_MB);
    const { getDbHandle } = await import("../../lib/db/index.ts");
    expect(getDbHandle().url).toBe(database.url);
    a = await setUpSchool(database.db, "Guard Test School A");
    b = await setUpSchool(database.db, "Guard Test School B");
    flights = (await import("../../app/api/v1/flights/route.ts")) as unknown as { POST: Handler };
    sites = (await import("../../app/api/v1/setup/sites/route.ts")) as unknown as { POST: Handler };
    preview = (await import("../../app/api/v1/setup/layouts/preview/route.ts")) as unknown as { POST: Handler };
  });
  afterAll(async () => {
    const { getDbHandle } = await import("../../lib/db/index.ts");
    await getDbHandle().db.$disconnect();
    await database?.drop();
  });

  describe("local mode (no accounts yet)", () => {
    test("a page on another port of this host cannot write: 403 and nothing is created", async () => {
      const foreign = await call(sites.POST, "/api/v1/setup/sites", { headers: browserHeaders({ origin: "http://127.0.0.1:8081", site: "same-site", contentType: "application/json" }), body: siteBody("Local forged") });
      expect(foreign.status).toBe(403);
      expect((await foreign.json()).error.code).toBe("cross-origin");
      expect(await sitesNamed("Local forged")).toBe(0);
    });

    test("a text/plain form post is refused with 415 even from our own page", async () => {
      const plain = await call(sites.POST, "/api/v1/setup/sites", { headers: browserHeaders({ origin: OWN_ORIGIN, site: "same-origin", contentType: "text/plain;charset=UTF-8" }), body: siteBody("Local plain") });
      expect(plain.status).toBe(415);
      expect(await sitesNamed("Local plain")).toBe(0);
    });

    test("a script on this machine (no Origin) and our own page still write", async () => {
      const script = await call(sites.POST, "/api/v1/setup/sites", { headers: browserHeaders({ contentType: "application/json" }), body: siteBody("Local script") });
      expect(script.status).toBe(201);
      const page = await call(sites.POST, "/api/v1/setup/sites", { headers: browserHeaders({ origin: OWN_ORIGIN, site: "same-origin", contentType: "application/json" }), body: siteBody("Local page") });
      expect(page.status).toBe(201);
    });
  });

  describe("shared server (accounts exist)", () => {
    let contributorCookie: string;
    let uploadToken: string;

    beforeAll(async () => {
      await createUser(database.db, { email: "coordinator@example.org", password: PASSWORD, displayName: "Coordinator" });
      const alice = await createUser(database.db, { email: "alice@example.org", password: PASSWORD, displayName: "Alice" });
      await addMembership(database.db, { userId: alice.id, schoolId: a.school.id, role: "contributor", byUserId: null });
      contributorCookie = `lapsebank_session=${(await signIn(database.db, { email: "alice@example.org", password: PASSWORD }, "test")).sessionSecret}`;
      uploadToken = (await createApiToken(database.db, { userId: alice.id, schoolId: a.school.id, name: "script", scopes: ["read", "upload"] })).token;
    });

    test("an anonymous chunked 50 MB upload is refused with 401 before its body is read", async () => {
      const body = countingBody(multipartHead(uploadFields(a, "2024-07-10T06:01:00Z"), "big.csv"), 50 * MB);
      const response = await call(flights.POST, "/api/v1/flights", { headers: browserHeaders({ contentType: `multipart/form-data; boundary=${BOUNDARY}` }), body: body.stream });
      expect(response.status).toBe(401);
      expect(body.pulled()).toBeLessThan(MB);
    });

    test("a contributor's upload to another school is refused with 403 once its fields are read, before the file", async () => {
      const body = countingBody(multipartHead(uploadFields(b, "2024-07-10T06:01:00Z"), "big.csv"), 50 * MB);
      const response = await call(flights.POST, "/api/v1/flights", { headers: browserHeaders({ origin: OWN_ORIGIN, site: "same-origin", cookie: contributorCookie, contentType: `multipart/form-data; boundary=${BOUNDARY}` }), body: body.stream });
      expect(response.status).toBe(403);
      expect(body.pulled()).toBeLessThan(MB);
    });

    test("a signed-in chunked upload over the limit gets 413 after about the limit is read", async () => {
      const body = countingBody(multipartHead(uploadFields(a, "2024-07-10T06:01:00Z"), "big.csv"), 50 * MB);
      const response = await call(flights.POST, "/api/v1/flights", { headers: browserHeaders({ origin: OWN_ORIGIN, site: "same-origin", cookie: contributorCookie, contentType: `multipart/form-data; boundary=${BOUNDARY}` }), body: body.stream });
      expect(response.status).toBe(413);
      expect((await response.json()).error.code).toBe("too-large");
      expect(body.pulled()).toBeGreaterThan(UPLOAD_LIMIT_BYTES);
      expect(body.pulled()).toBeLessThan(UPLOAD_LIMIT_BYTES + MB);
    });

    test("a signed-in upload from our own page and a token upload without Origin are stored byte for byte", async () => {
      const first = makeFlightFile({ seed: 71 });
      const page = await call(flights.POST, "/api/v1/flights", { headers: browserHeaders({ origin: OWN_ORIGIN, site: "same-origin", cookie: contributorCookie, contentType: `multipart/form-data; boundary=${BOUNDARY}` }), body: multipartBody(uploadFields(a, "2024-07-10T06:01:00Z"), first.bytes) });
      expect(page.status).toBe(201);
      const pageFlight = (await page.json()).flight.id as string;
      const stored = await database.db.rawFile.findFirstOrThrow({ where: { flight: { id: pageFlight } } });
      expect(Buffer.from(stored.bytes).equals(Buffer.from(first.bytes))).toBe(true);

      const second = makeFlightFile({ seed: 72 });
      const headers = browserHeaders({ contentType: `multipart/form-data; boundary=${BOUNDARY}` });
      headers.set("Authorization", `Bearer ${uploadToken}`);
      const script = await call(flights.POST, "/api/v1/flights", { headers, body: multipartBody(uploadFields(a, "2024-07-11T06:01:00Z"), second.bytes) });
      expect(script.status).toBe(201);
    });

    test("cookie writes from a foreign Origin or a cross-site fetch are refused with 403; same-origin writes go through", async () => {
      const foreign = await call(sites.POST, "/api/v1/setup/sites", { headers: browserHeaders({ origin: "http://127.0.0.1:8081", cookie: contributorCookie, contentType: "application/json" }), body: siteBody("Forged by origin") });
      expect(foreign.status).toBe(403);
      const crossSite = await call(sites.POST, "/api/v1/setup/sites", { headers: browserHeaders({ site: "cross-site", cookie: contributorCookie, contentType: "application/json" }), body: siteBody("Forged cross-site") });
      expect(crossSite.status).toBe(403);
      const sameSite = await call(sites.POST, "/api/v1/setup/sites", { headers: browserHeaders({ origin: "http://127.0.0.1:8081", site: "same-site", cookie: contributorCookie, contentType: "application/json" }), body: siteBody("Forged same-site") });
      expect(sameSite.status).toBe(403);
      expect(await database.db.site.count({ where: { name: { startsWith: "Forged" } } })).toBe(0);

      const own = await call(sites.POST, "/api/v1/setup/sites", { headers: browserHeaders({ origin: OWN_ORIGIN, site: "same-origin", cookie: contributorCookie, contentType: "application/json" }), body: siteBody("Own page site") });
      expect(own.status).toBe(201);
    });

    test("a forged text/plain upload of the site form is refused with 415, and so is an anonymous one with 401 first", async () => {
      const plain = await call(sites.POST, "/api/v1/setup/sites", { headers: browserHeaders({ origin: OWN_ORIGIN, site: "same-origin", cookie: contributorCookie, contentType: "text/plain" }), body: siteBody("Plain text site") });
      expect(plain.status).toBe(415);
      const anonymous = await call(sites.POST, "/api/v1/setup/sites", { headers: browserHeaders({ contentType: "application/json" }), body: siteBody("Anonymous site") });
      expect(anonymous.status).toBe(401);
      expect(await database.db.site.count({ where: { name: { in: ["Plain text site", "Anonymous site"] } } })).toBe(0);
    });

    test("an oversized JSON body gets 413 after about 1 MB is read", async () => {
      const head = new TextEncoder().encode(`{"schoolId":"${a.school.id}","name":"`);
      const body = countingBody(head, 20 * MB);
      const response = await call(sites.POST, "/api/v1/setup/sites", { headers: browserHeaders({ origin: OWN_ORIGIN, site: "same-origin", cookie: contributorCookie, contentType: "application/json" }), body: body.stream });
      expect(response.status).toBe(413);
      expect(body.pulled()).toBeLessThan(2 * MB);
    });

    test("the layout preview refuses visitors before reading and still previews for a contributor", async () => {
      const sample = makeFlightFile({ seed: 73 });
      const fields = { spec: JSON.stringify(COMMA_COUNTS_LAYOUT) };
      const body = countingBody(multipartHead(fields, "sample.csv"), 50 * MB);
      const anonymous = await call(preview.POST, "/api/v1/setup/layouts/preview", { headers: browserHeaders({ contentType: `multipart/form-data; boundary=${BOUNDARY}` }), body: body.stream });
      expect(anonymous.status).toBe(401);
      expect(body.pulled()).toBeLessThan(MB);

      const shown = await call(preview.POST, "/api/v1/setup/layouts/preview", { headers: browserHeaders({ origin: OWN_ORIGIN, site: "same-origin", cookie: contributorCookie, contentType: `multipart/form-data; boundary=${BOUNDARY}` }), body: multipartBody(fields, sample.bytes, "sample.csv") });
      expect(shown.status).toBe(200);
      const result = (await shown.json()).preview as { fileName: string; partial: boolean; dataRowCount: number };
      expect(result.fileName).toBe("sample.csv");
      expect(result.partial).toBe(sample.bytes.byteLength > 64 * 1024);
      expect(result.dataRowCount).toBeGreaterThan(0);
    });
  });
});
