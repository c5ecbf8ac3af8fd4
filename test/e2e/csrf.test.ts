import type { ChildProcess } from "node:child_process";
import http from "node:http";
import { chromium, type Browser, type BrowserContext, type Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { createUser } from "../../lib/auth/accounts.ts";
import { CHROMIUM_PATH } from "../support/e2e-browser.ts";
import { makeFlightFile, setUpSchool } from "../support/flight-files.ts";
import { loopbackContext, startNextApp } from "../support/e2e-app.ts";
import { freeLoopbackPort } from "../support/free-port.ts";
import { createTestDatabase, type TestDatabase } from "../support/test-databases.ts";

// A page served from ANOTHER loopback port is the same site as the app (cookies ignore ports, so
// a SameSite=Lax session cookie goes along) but a different origin. It tries what a hostile page
// on a school network could: a no-cors fetch that uploads a public flight, a text/plain form that
// posts JSON to the setup API, and a plain form that replays a server action. Nothing may happen.

const PASSWORD = "a long enough passphrase";
let database: TestDatabase;
let app: ChildProcess | undefined;
let appBase = "";
let browser: Browser;
let attacker: http.Server;
let attackerBase = "";
let attackerPage = "";
const ids = { school: "", site: "", layout: "", sensor: "" };

async function startApp(url: string): Promise<string> {
  const { base, server } = await startNextApp(url);
  app = server;
  return base;
}

function newContext(): Promise<{ context: BrowserContext; page: Page }> {
  return loopbackContext(browser);
}

/** The hostile page: three attempts against `target`, then `document.title = "done"`. */
function hostilePage(target: string, fields: Record<string, string>, fileText: string, actionId: string | null): string {
  const siteJson = JSON.stringify({ schoolId: fields.schoolId ?? "", name: "Forged site", latitudeDeg: 48, longitudeDeg: 9, elevationM: 300, timeZone: "Europe/Berlin" });
  // enctype=text/plain sends `name=value`: a name that is JSON up to an open string, and a value
  // that closes it, make the body parse as JSON.
  const plainName = `${siteJson.slice(0, -1)},"padding":"`;
  const attr = (text: string) => text.replace(/&/g, "&amp;").replace(/"/g, "&quot;").replace(/</g, "&lt;");
  return `<!doctype html><html><head><title>waiting</title></head><body>
<iframe name="plain-sink"></iframe><iframe name="action-sink"></iframe>
<form id="plain" method="post" enctype="text/plain" target="plain-sink" action="${target}/api/v1/setup/sites"><input name="${attr(plainName)}" value='"}'></form>
<form id="action" method="post" enctype="multipart/form-data" target="action-sink" action="${target}/account">${actionId ? `<input type="hidden" name="$ACTION_ID_${attr(actionId)}" value="">` : ""}</form>
<script>
(async () => {
  const form = new FormData();
  for (const [k, v] of Object.entries(${JSON.stringify(fields)})) form.set(k, v);
  form.set("file", new Blob([${JSON.stringify(fileText)}], { type: "text/csv" }), "forged.csv");
  try { await fetch(${JSON.stringify(`${target}/api/v1/flights`)}, { method: "POST", body: form, credentials: "include", mode: "no-cors" }); } catch (e) {}
  const loaded = (name) => new Promise((resolve) => document.querySelector('iframe[name="' + name + '"]').addEventListener("load", resolve, { once: true }));
  const plain = loaded("plain-sink");
  document.getElementById("plain").submit();
  await plain;
  const action = loaded("action-sink");
  document.getElementById("action").submit();
  await action;
  document.title = "done";
})();
</script></body></html>`;
}

/** Opens the hostile page and returns the status of every answer the app gave it, by path. */
async function visitHostilePage(page: Page, target: string): Promise<Map<string, number>> {
  const statuses = new Map<string, number>();
  page.on("response", (response) => {
    const url = new URL(response.url());
    if (url.origin === target && response.request().method() === "POST") statuses.set(url.pathname, response.status());
  });
  await page.goto(`${attackerBase}/`);
  await page.waitForFunction(() => document.title === "done", undefined, { timeout: 30_000 });
  return statuses;
}

describe("requests from a page on another port of this host", () => {
  beforeAll(async () => {
    database = await createTestDatabase("sqlite");
    const school = await setUpSchool(database.db, "Cedar Flats School");
    Object.assign(ids, { school: school.school.id, site: school.site.id, layout: school.layout.id, sensor: school.sensor.id });
    await createUser(database.db, { email: "coordinator@example.org", password: PASSWORD, displayName: "Coordinator" });
    appBase = await startApp(database.url);
    attacker = http.createServer((_request, response) => {
      response.writeHead(200, { "Content-Type": "text/html; charset=utf-8" });
      response.end(attackerPage);
    });
    const port = await freeLoopbackPort();
    await new Promise<void>((resolve) => attacker.listen(port, "127.0.0.1", resolve));
    attackerBase = `http://127.0.0.1:${port}`;
    browser = await chromium.launch({ executablePath: CHROMIUM_PATH, headless: true, args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update", "--disable-sync", "--no-first-run", "--disable-quic"] });
  });

  afterAll(async () => {
    await browser?.close();
    await new Promise<void>((resolve) => (attacker ? attacker.close(() => resolve()) : resolve()));
    try {
      if (app?.pid) process.kill(-app.pid, "SIGTERM");
    } catch {
      // already gone
    }
    await new Promise((r) => setTimeout(r, 500));
    await database?.drop();
  });

  test("signed in: the forged upload, the text/plain site and the replayed sign-out are all refused with 403 and nothing changes", async () => {
    const { context, page } = await newContext();
    await page.goto(`${appBase}/account`);
    const signIn = page.getByRole("form", { name: "Sign in" });
    await signIn.getByLabel("Email").fill("coordinator@example.org");
    await signIn.getByLabel("Password").fill(PASSWORD);
    await signIn.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/flights/);
    await page.goto(`${appBase}/account`);
    const actionField = await page.locator('form input[type="hidden"][name^="$ACTION_ID_"]').first().getAttribute("name");
    expect(actionField).toBeTruthy();

    const fields = { schoolId: ids.school, siteId: ids.site, layoutId: ids.layout, sensorId: ids.sensor, launchAtUtc: "2024-07-10T06:01:00Z", visibility: "public", title: "Forged flight" };
    attackerPage = hostilePage(appBase, fields, makeFlightFile({ seed: 801 }).text, actionField!.replace("$ACTION_ID_", ""));
    const statuses = await visitHostilePage(page, appBase);
    expect(Object.fromEntries(statuses)).toEqual({ "/api/v1/flights": 403, "/api/v1/setup/sites": 403, "/account": 403 });
    expect(await database.db.flight.count()).toBe(0);
    expect(await database.db.site.count({ where: { name: "Forged site" } })).toBe(0);

    // Still signed in: the replayed sign-out did nothing.
    await page.goto(`${appBase}/account`);
    await page.getByRole("button", { name: "Sign out" }).waitFor({ state: "visible", timeout: 20_000 });
    await context.close();
  });

  test("local mode (no accounts): the same page is refused by the app the e2e set-up serves", async () => {
    const localBase = inject("e2eBaseUrl");
    const countFlights = async () => ((await (await fetch(`${localBase}/api/v1/flights?pageSize=1`)).json()) as { paging: { total: number } }).paging.total;
    const sites = async () => ((await (await fetch(`${localBase}/api/v1/setup/sites`)).json()) as { sites: Array<{ id: string; name: string; schoolId: string }> }).sites;
    const before = await countFlights();
    const site = (await sites())[0];
    expect(site).toBeDefined();
    const { context, page } = await newContext();
    attackerPage = hostilePage(localBase, { schoolId: site!.schoolId, siteId: site!.id, launchAtUtc: "2024-07-10T06:01:00Z", visibility: "public", title: "Forged flight" }, makeFlightFile({ seed: 802 }).text, null);
    const statuses = await visitHostilePage(page, localBase);
    expect(statuses.get("/api/v1/flights")).toBe(403);
    expect(statuses.get("/api/v1/setup/sites")).toBe(403);
    expect(await countFlights()).toBe(before);
    expect((await sites()).filter((s) => s.name === "Forged site")).toEqual([]);
    await context.close();
  });
});
