import type { BrowserContext, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openSession, saveScreenshot, type E2eSession } from "../support/e2e-browser.ts";

// Every page at a phone's width (390 CSS px): none may scroll sideways. A wide table may scroll
// inside its own region; the document itself must not be wider than the window.
const PHONE = { width: 390, height: 844 };

let session: E2eSession;
let context: BrowserContext;
let page: Page;

beforeAll(async () => {
  session = await openSession();
  context = await session.browser.newContext({ baseURL: session.baseUrl, viewport: PHONE, isMobile: true, hasTouch: true, locale: "en-GB", timezoneId: "UTC" });
  await context.route("**/*", (route) => {
    const { hostname, protocol } = new URL(route.request().url());
    return protocol === "data:" || protocol === "blob:" || hostname === "127.0.0.1" || hostname === "localhost" ? route.continue() : route.abort("blockedbyclient");
  });
  page = await context.newPage();
});

afterAll(async () => {
  await context?.close();
  await session?.close();
});

/** How far the document is wider than the window (0 when it does not scroll sideways), and what sticks out. */
async function overflowOf(path: string): Promise<{ extraPx: number; widest: string[] }> {
  await page.goto(path);
  await page.waitForLoadState("networkidle");
  return page.evaluate(() => {
    const width = window.innerWidth;
    const extraPx = document.documentElement.scrollWidth - width;
    const widest = extraPx <= 0 ? [] : [...document.querySelectorAll("body *")]
      .filter((el) => el.getBoundingClientRect().right > width + 1 && !el.closest(".table-wrap, .chart-frame"))
      .slice(0, 5)
      .map((el) => `${el.tagName.toLowerCase()}.${el.className} (${Math.round(el.getBoundingClientRect().right)} px)`);
    return { extraPx, widest };
  });
}

/** The first link on `indexPath` whose address matches `pattern`, e.g. a flight's page from the Archive. */
async function firstLink(indexPath: string, pattern: RegExp): Promise<string | null> {
  await page.goto(indexPath);
  const hrefs = await page.locator("a[href]").evaluateAll((links) => links.map((a) => a.getAttribute("href") ?? ""));
  return hrefs.find((href) => pattern.test(href)) ?? null;
}

const FIXED_PAGES = [
  "/",
  "/flights",
  "/flights?season=JJA&sort=tropopause-desc&pageSize=10",
  // A bad or unknown parameter is reported, and the report must not widen the page.
  `/flights?sites=${"x".repeat(120)}&from=not-a-date`,
  "/climatology",
  "/climatology?claim=two-group&groupA=JJA&groupB=Oct-Nov&groupBy=season",
  `/climatology?sites=${"x".repeat(120)}`,
  "/upload",
  "/account",
  "/audit",
  "/setup",
  "/setup/sites",
  "/setup/sensors",
  "/setup/payloads",
  "/setup/layouts",
  "/setup/layouts/new",
  "/setup/calibrations/new",
  "/setup/parameters",
  "/setup/reprocess",
  "/invite/not-a-real-invitation",
  "/no-such-page",
];

const DETAIL_PAGES: Array<[string, RegExp]> = [
  ["/flights", /^\/flights\/[^/?]+$/],
  ["/setup/sites", /^\/setup\/sites\/[^/?]+$/],
  ["/setup/sensors", /^\/setup\/sensors\/[^/?]+$/],
  ["/setup/payloads", /^\/setup\/payloads\/[^/?]+$/],
  ["/setup/layouts", /^\/setup\/layouts\/(?!new)[^/?]+$/],
  ["/setup", /^\/schools\/[^/?]+\/members$/],
];

describe("phones (390 px wide)", () => {
  it("no page scrolls sideways", async () => {
    const paths = [...FIXED_PAGES];
    for (const [indexPath, pattern] of DETAIL_PAGES) {
      const href = await firstLink(indexPath, pattern);
      if (href) paths.push(href);
    }
    const sensor = paths.find((p) => /^\/setup\/sensors\/[^/]+$/.test(p));
    if (sensor) {
      const calibration = await firstLink(sensor, /^\/setup\/calibrations\/(?!new)[^/?]+$/);
      if (calibration) paths.push(calibration);
    }
    // The demo archive has flights, sites, sensors, payloads and layouts: each detail page was found.
    expect(paths.length).toBeGreaterThanOrEqual(FIXED_PAGES.length + 5);

    const wide: string[] = [];
    for (const path of paths) {
      const { extraPx, widest } = await overflowOf(path);
      if (extraPx > 0) {
        wide.push(`${path}: ${extraPx} px too wide; ${widest.join(", ")}`);
        await saveScreenshot(page, `phone-${path.replace(/[^a-z0-9]+/gi, "-").slice(0, 60)}`);
      }
    }
    expect(wide).toEqual([]);
  });
});
