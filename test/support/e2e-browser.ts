import fs from "node:fs";
import { chromium, type Browser, type BrowserContext, type Page } from "playwright-core";
import { inject } from "vitest";

/** Debian's chromium; CI installs it with `apt-get install -y chromium`. Never a downloaded browser. */
export const CHROMIUM_PATH = "/usr/bin/chromium";

const CHROMIUM_ARGS = [
  "--headless",
  "--no-sandbox",
  "--disable-gpu",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
  "--no-first-run",
  "--disable-quic",
];

const LOOPBACK_HOSTS = new Set(["127.0.0.1", "localhost", "[::1]"]);

export interface E2eSession {
  baseUrl: string;
  browser: Browser;
  context: BrowserContext;
  page: Page;
  /** Errors the page threw or logged and failed requests (HTTP 4xx/5xx); tests check this stays empty. */
  pageErrors: string[];
  close(): Promise<void>;
}

/**
 * Launches Debian's chromium and opens one page against the app the e2e global set-up started.
 * Every request that is not for loopback is aborted, so a test can never reach the network.
 */
export async function openSession(): Promise<E2eSession> {
  if (!fs.existsSync(CHROMIUM_PATH)) {
    throw new Error(`${CHROMIUM_PATH} is missing: install Debian's chromium (apt-get install -y chromium)`);
  }
  const baseUrl = inject("e2eBaseUrl");
  const browser = await chromium.launch({ executablePath: CHROMIUM_PATH, args: CHROMIUM_ARGS, headless: true });
  const context = await browser.newContext({ baseURL: baseUrl, viewport: { width: 1280, height: 900 }, locale: "en-GB", timezoneId: "UTC" });
  await context.route("**/*", (route) => {
    const { protocol, hostname } = new URL(route.request().url());
    const local = (protocol === "http:" || protocol === "https:" || protocol === "ws:") && LOOPBACK_HOSTS.has(hostname);
    return local || protocol === "data:" || protocol === "blob:" ? route.continue() : route.abort("blockedbyclient");
  });
  const page = await context.newPage();
  const pageErrors: string[] = [];
  page.on("pageerror", (error) => pageErrors.push(`uncaught: ${error.message}`));
  page.on("console", (message) => {
    // A failed request is reported below with its address; the console line has none.
    if (message.type() === "error" && !message.text().startsWith("Failed to load resource")) pageErrors.push(`console: ${message.text()}`);
  });
  page.on("response", (response) => {
    if (response.status() >= 400 && !response.url().endsWith("/favicon.ico")) pageErrors.push(`HTTP ${response.status()} ${response.request().method()} ${response.url()}`);
  });
  return {
    baseUrl,
    browser,
    context,
    page,
    pageErrors,
    close: async () => {
      await context.close();
      await browser.close();
    },
  };
}

/** Full-page screenshot at /tmp/lapsebank-e2e-<name>.png; returns the path. */
export async function saveScreenshot(page: Page, name: string): Promise<string> {
  const file = `/tmp/lapsebank-e2e-${name}.png`;
  await page.screenshot({ path: file, fullPage: true });
  return file;
}
