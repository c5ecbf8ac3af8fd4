import type { ChildProcess } from "node:child_process";
import { chromium, type Browser, type BrowserContext, type Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { addMembership, createApiToken, createUser } from "../../lib/auth/accounts.ts";
import { editFlight } from "../../lib/ingest/flight-admin.ts";
import { ingestFlightFile } from "../../lib/ingest/index.ts";
import { CHROMIUM_PATH } from "../support/e2e-browser.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";
import { loopbackContext, startNextApp } from "../support/e2e-app.ts";

// Program-wide sharing on one database served by TWO app processes (nothing may live in one
// process's memory): sessions, login rate limits and visibility must hold across both.

const PASSWORD = "a long enough passphrase";
let database: TestDatabase;
const servers: ChildProcess[] = [];
const bases: string[] = [];
let browser: Browser;
const ids = { privateA: "", programB: "", schoolA: "", schoolB: "", siteA: "", layoutA: "", sensorA: "" };


async function startApp(url: string): Promise<string> {
  const { base, server } = await startNextApp(url);
  servers.push(server);
  return base;
}

function newContext(): Promise<{ context: BrowserContext; page: Page }> {
  return loopbackContext(browser);
}

async function textOf(locator: import("playwright-core").Locator): Promise<string> {
  await locator.first().waitFor({ state: "visible", timeout: 20_000 });
  return locator.first().innerText();
}

async function signInThroughForm(page: Page, base: string, email: string, password = PASSWORD) {
  await page.goto(`${base}/account`);
  const form = page.getByRole("form", { name: "Sign in" });
  await form.getByLabel("Email").fill(email);
  await form.getByLabel("Password").fill(password);
  await form.getByRole("button", { name: "Sign in" }).click();
}

describe("sharing across schools on two app processes", () => {
  beforeAll(async () => {
    database = await createTestDatabase(testEngines().includes("postgres") ? "postgres" : "sqlite");
    const db = database.db;
    const a = await setUpSchool(db, "Alder Ridge School");
    const b = await setUpSchool(db, "Birch Hollow School");
    Object.assign(ids, { schoolA: a.school.id, schoolB: b.school.id, siteA: a.site.id, layoutA: a.layout.id, sensorA: a.sensor.id });
    const upload = async (s: typeof a, seed: number, visibility: string, title: string) =>
      (await ingestFlightFile(db, { file: { name: `${title}.csv`, bytes: makeFlightFile({ seed }).bytes }, metadata: { schoolId: s.school.id, siteId: s.site.id, layoutId: s.layout.id, sensorId: s.sensor.id, launchAtUtc: "2024-07-10T06:01:00Z", visibility, title } })).flightId;
    ids.privateA = await upload(a, 501, "school", "Alder private flight");
    ids.programB = await upload(b, 502, "program", "Birch program flight");
    await createUser(db, { email: "coordinator@example.org", password: PASSWORD, displayName: "Coordinator" });
    const alice = await createUser(db, { email: "alice@example.org", password: PASSWORD, displayName: "Alice" });
    const bob = await createUser(db, { email: "bob@example.org", password: PASSWORD, displayName: "Bob" });
    await addMembership(db, { userId: alice.id, schoolId: a.school.id, role: "contributor", byUserId: null });
    await addMembership(db, { userId: bob.id, schoolId: b.school.id, role: "contributor", byUserId: null });
    bases.push(await startApp(database.url), await startApp(database.url));
    browser = await chromium.launch({ executablePath: CHROMIUM_PATH, headless: true, args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update", "--disable-sync", "--no-first-run", "--disable-quic"] });
  });

  afterAll(async () => {
    await browser?.close();
    for (const server of servers) {
      try {
        if (server.pid) process.kill(-server.pid, "SIGTERM");
      } catch {
        // already gone
      }
    }
    await new Promise((r) => setTimeout(r, 500));
    await database?.drop();
  });

  test("each member sees what they should, and a session made on one process works on the other", async () => {
    const [one, two] = bases as [string, string];
    const alice = await newContext();
    await signInThroughForm(alice.page, one, "alice@example.org");
    await alice.page.waitForURL(/\/flights/);
    await alice.page.goto(`${two}/flights`); // the other process: same cookie, same database session
    await alice.page.getByRole("link", { name: "Alder private flight" }).waitFor({ state: "visible", timeout: 20_000 });
    await alice.page.getByRole("link", { name: "Birch program flight" }).waitFor({ state: "visible", timeout: 20_000 });
    await alice.context.close();

    const bob = await newContext();
    await signInThroughForm(bob.page, two, "bob@example.org");
    await bob.page.waitForURL(/\/flights/);
    await bob.page.goto(`${one}/flights`);
    await bob.page.getByRole("link", { name: "Birch program flight" }).waitFor({ state: "visible", timeout: 20_000 });
    expect(await bob.page.getByRole("link", { name: "Alder private flight" }).count()).toBe(0);
    const direct = await bob.page.goto(`${one}/flights/${ids.privateA}`);
    expect(direct?.status()).toBe(404);
    await bob.context.close();

    const visitor = await newContext();
    await visitor.page.goto(`${one}/flights`);
    expect(await visitor.page.getByRole("link", { name: "Birch program flight" }).count()).toBe(0);
    await visitor.context.close();
  });

  test("a sign-in link cannot send the browser to another host (dot segments normalise to //host)", async () => {
    const [one] = bases as [string, string];
    const { context, page } = await newContext();
    const requested: string[] = [];
    page.on("request", (request) => requested.push(new URL(request.url()).host));
    await page.goto(`${one}/account?next=${encodeURIComponent("/.//evil.example/phish")}`);
    const form = page.getByRole("form", { name: "Sign in" });
    await form.getByLabel("Email").fill("alice@example.org");
    await form.getByLabel("Password").fill(PASSWORD);
    await form.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(`${one}/flights`, { timeout: 20_000 });
    expect(new URL(page.url()).host).toBe(new URL(one).host);
    expect(requested).not.toContain("evil.example");
    await context.close();
  });

  test("after a wrong password the email stays filled in and Enter signs in with the right one", async () => {
    const [one] = bases as [string, string];
    const { context, page } = await newContext();
    await signInThroughForm(page, one, "bob@example.org", "not the password");
    const form = page.getByRole("form", { name: "Sign in" });
    expect(await textOf(form.getByRole("alert"))).toContain("wrong");
    expect(await form.getByLabel("Email").inputValue()).toBe("bob@example.org");
    await form.getByLabel("Password").fill(PASSWORD);
    await form.getByLabel("Password").press("Enter");
    await page.waitForURL(`${one}/flights`, { timeout: 20_000 });
    await context.close();
  });

  test("failed logins are counted across both processes; the owner signs in once the wait is over", async () => {
    const [one, two] = bases as [string, string];
    const target = "coordinator@example.org";
    for (let i = 0; i < 5; i++) {
      const { context, page } = await newContext();
      await signInThroughForm(page, i % 2 ? two : one, target, "wrong password!");
      expect(await textOf(page.getByRole("form", { name: "Sign in" }).getByRole("alert"))).toContain("wrong");
      await context.close();
    }
    const { context, page } = await newContext();
    await signInThroughForm(page, one, target);
    expect(await textOf(page.getByRole("form", { name: "Sign in" }).getByRole("alert"))).toContain("Too many failed sign-in attempts");
    // The wait (15 s after the 5th failure) is over: the right password signs in on the other process.
    await database.db.loginThrottle.updateMany({ where: { key: { startsWith: `account:${target}` } }, data: { nextCheckAt: new Date(Date.now() - 1) } });
    await signInThroughForm(page, two, target);
    await page.waitForURL(`${two}/flights`, { timeout: 20_000 });
    await context.close();
  });

  test("API: 401 without credentials, 403 for another school, revoked tokens stop at once", async () => {
    const [one, two] = bases as [string, string];
    const file = makeFlightFile({ seed: 503 });
    const form = () => {
      const f = new FormData();
      f.set("file", new Blob([file.bytes]), "api.csv");
      for (const [k, v] of Object.entries({ schoolId: ids.schoolA, siteId: ids.siteA, layoutId: ids.layoutA, sensorId: ids.sensorA, launchAtUtc: "2024-07-11T06:01:00Z" })) f.set(k, v);
      return f;
    };
    const anonymous = await fetch(`${one}/api/v1/flights`, { method: "POST", body: form() });
    expect(anonymous.status).toBe(401);
    const bob = await database.db.user.findUniqueOrThrow({ where: { email: "bob@example.org" } });
    const bobToken = await createApiToken(database.db, { userId: bob.id, schoolId: ids.schoolB, name: "bob", scopes: ["read", "upload"] });
    const refused = await fetch(`${two}/api/v1/flights`, { method: "POST", body: form(), headers: { Authorization: `Bearer ${bobToken.token}` } });
    expect(refused.status).toBe(403);
    const hidden = await fetch(`${one}/api/v1/flights/${ids.privateA}`, { headers: { Authorization: `Bearer ${bobToken.token}` } });
    expect(hidden.status).toBe(404);
    const alice = await database.db.user.findUniqueOrThrow({ where: { email: "alice@example.org" } });
    const aliceToken = await createApiToken(database.db, { userId: alice.id, schoolId: ids.schoolA, name: "alice", scopes: ["upload"] });
    const created = await fetch(`${two}/api/v1/flights`, { method: "POST", body: form(), headers: { Authorization: `Bearer ${aliceToken.token}` } });
    expect(created.status).toBe(201);
    const body = JSON.stringify(await created.json());
    expect(body).not.toContain(aliceToken.token);
    await database.db.apiToken.update({ where: { id: aliceToken.id }, data: { revokedAt: new Date() } });
    const afterRevoke = await fetch(`${one}/api/v1/flights`, { headers: { Authorization: `Bearer ${aliceToken.token}` } });
    expect(afterRevoke.status).toBe(401);
  });

  test("titles with HTML are shown as text, and a cross-origin server action post is refused", async () => {
    const [one] = bases as [string, string];
    const alice = await database.db.user.findUniqueOrThrow({ where: { email: "alice@example.org" }, include: { memberships: true } });
    await editFlight(database.db, { kind: "member", userId: alice.id, isProgramAdmin: false, schoolIds: [ids.schoolA], memberships: [{ schoolId: ids.schoolA, role: "contributor" }] }, ids.privateA, { title: `<img src=x onerror="window.__owned=1"><b>bold</b>` });
    const { context, page } = await newContext();
    await signInThroughForm(page, one, "alice@example.org");
    await page.waitForURL(/\/flights/);
    await page.goto(`${one}/flights/${ids.privateA}`);
    expect((await textOf(page.getByRole("heading", { level: 1 }))).trim()).toBe(`<img src=x onerror="window.__owned=1"><b>bold</b>`);
    expect(await page.evaluate(() => (window as unknown as { __owned?: number }).__owned)).toBeUndefined();
    expect(await page.locator("h1 b, h1 img").count()).toBe(0);

    // The sign-out form carries its server action id; replay it from a foreign origin.
    await page.goto(`${one}/account`);
    const actionField = await page.locator('form input[type="hidden"][name^="$ACTION_ID_"]').first().getAttribute("name");
    expect(actionField).toBeTruthy();
    const actionId = actionField!.replace("$ACTION_ID_", "");
    const cookie = (await context.cookies()).map((c) => `${c.name}=${c.value}`).join("; ");
    const forged = await fetch(`${one}/account`, {
      method: "POST",
      headers: { "Next-Action": actionId, Origin: "http://attacker.invalid", Cookie: cookie, "Content-Type": "text/plain;charset=UTF-8" },
      body: "[]",
      redirect: "manual",
    });
    expect(forged.status).toBeGreaterThanOrEqual(400);
    // Still signed in: the forged sign-out did nothing.
    await page.goto(`${one}/account`);
    await page.getByRole("button", { name: "Sign out" }).waitFor({ state: "visible", timeout: 20_000 });
    await context.close();
  });
});
