import { DateTime } from "luxon";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { generateDemoProgram } from "../../seed/demo-program.ts";
import { openSession, saveScreenshot, type E2eSession } from "../support/e2e-browser.ts";
import { cellText, columnIndex, dataRows, factValue, firstNumber } from "../support/e2e-page.ts";

// The global set-up loaded the demo archive (seed/) into a fresh database, so every expected
// count below is derived [D] from the same deterministic generator the loader used.
const program = generateDemoProgram();
const siteZone = new Map(program.sites.map((site) => [site.key, site.timeZone]));
/** [D] meteorological season of the local launch month (lib/analysis/launch-time uses the site's zone). */
const demoJjaCount = program.flights.filter((flight) => {
  const zone = siteZone.get(flight.siteKey);
  const month = DateTime.fromISO(flight.launchAtUtc, { zone: zone ?? "UTC" }).month;
  return month >= 6 && month <= 8;
}).length;
const PAGE_SIZE = 25; // the archive's default rows per page

let session: E2eSession;

beforeAll(async () => {
  session = await openSession();
});

afterAll(async () => {
  await session?.close();
});

function flightsShown(status: string): { first: number; last: number; total: number } {
  const match = /Flights (\d+)–(\d+) of (\d+)/.exec(status);
  if (!match) throw new Error(`unexpected archive status "${status}"`);
  return { first: Number(match[1]), last: Number(match[2]), total: Number(match[3]) };
}

describe("archive", () => {
  it("lists the demo flights, paged", async () => {
    const { page } = session;
    await page.goto("/flights");
    await expect.poll(() => page.getByRole("heading", { level: 1 }).innerText()).toBe("Archive");
    const rows = dataRows(page, "Flights");
    expect(await rows.count()).toBe(PAGE_SIZE);

    const shown = flightsShown(await page.getByRole("status").first().innerText());
    expect(shown.first).toBe(1);
    expect(shown.last).toBe(PAGE_SIZE);
    // [D] the demo generator's flight count; an upload test may have added flights before this one ran
    expect(shown.total).toBeGreaterThanOrEqual(program.flights.length);
    expect(program.flights.length).toBeGreaterThanOrEqual(120);

    // Every school of the demo program appears in the school filter.
    const schoolOptions = await page.getByLabel("School", { exact: true }).getByRole("option").allInnerTexts();
    for (const school of program.schools) expect(schoolOptions).toContain(school.name);

    await saveScreenshot(page, "archive");

    const firstPageTitles = await rows.getByRole("link").allInnerTexts();
    await page.getByRole("navigation", { name: "Pages" }).getByRole("link", { name: /Next/ }).click();
    await page.waitForURL(/[?&]page=2\b/);
    const secondShown = flightsShown(await page.getByRole("status").first().innerText());
    expect(secondShown.first).toBe(PAGE_SIZE + 1);
    const secondPageTitles = await dataRows(page, "Flights").getByRole("link").allInnerTexts();
    expect(secondPageTitles).toHaveLength(PAGE_SIZE);
    expect(secondPageTitles.filter((title) => firstPageTitles.includes(title))).toEqual([]);
  });

  it("filters by season through the URL", async () => {
    const { page } = session;
    await page.goto("/flights");
    const before = await dataRows(page, "Flights").getByRole("link").allInnerTexts();

    await page.getByLabel("Season").selectOption("JJA");
    await page.getByLabel("Rows per page").selectOption("200");
    await page.getByRole("button", { name: "Apply" }).click();
    await page.waitForURL(/[?&]season=JJA\b/);

    const rows = dataRows(page, "Flights");
    const shown = flightsShown(await page.getByRole("status").first().innerText());
    // [D] demo flights launched in a local June, July or August; the upload test launches outside JJA
    expect(shown.total).toBe(demoJjaCount);
    expect(await rows.count()).toBe(demoJjaCount);
    const seasonColumn = await columnIndex(page, "Flights", "Season");
    for (let i = 0; i < demoJjaCount; i++) {
      expect(await cellText(rows.nth(i), seasonColumn)).toMatch(/^JJA\b/);
    }
    const after = await rows.getByRole("link").allInnerTexts();
    expect(after.slice(0, before.length)).not.toEqual(before);

    // The hemisphere-aware name: JJA is winter at the southern site, DJF in the north.
    await page.goto("/flights?season=winter&pageSize=200");
    const winterRows = dataRows(page, "Flights");
    const winterCount = await winterRows.count();
    expect(winterCount).toBeGreaterThan(0);
    const seasons = new Set<string>();
    for (let i = 0; i < winterCount; i++) seasons.add(await cellText(winterRows.nth(i), seasonColumn));
    // [P] meteorological winter: DJF in the northern hemisphere, JJA in the southern
    expect([...seasons].sort()).toEqual(["DJF (winter)", "JJA (winter)"]);
    await saveScreenshot(page, "archive-winter");
  });

  it("opens a flight page from its row, with the tropopause height and the cautions", async () => {
    const { page, pageErrors } = session;
    await page.goto("/flights?season=JJA");
    // A flight that burst below its tropopause shows "—" there; take the first one that has one.
    const rows = dataRows(page, "Flights");
    const tropopauseColumn = await columnIndex(page, "Flights", "Tropopause (km)");
    const rowCount = await rows.count();
    let rowIndex = 0;
    while (rowIndex < rowCount && !/^\d/.test(await cellText(rows.nth(rowIndex), tropopauseColumn))) rowIndex++;
    expect(rowIndex, "a JJA flight with a tropopause on the first page").toBeLessThan(rowCount);
    const listedKm = Number(await cellText(rows.nth(rowIndex), tropopauseColumn));
    const link = rows.nth(rowIndex).getByRole("link").first();
    const title = (await link.innerText()).trim();
    await link.click();
    await page.waitForURL(/\/flights\/[^/?]+$/);
    expect((await page.getByRole("heading", { level: 1 }).innerText()).trim()).toBe(title);

    const tropopause = (await factValue(page, "First tropopause (MSL)").innerText()).trim();
    expect(tropopause).toMatch(/^\d+\.\d{2} km\b/);
    // [D] the archive row and the flight page read the same stored summary
    expect(firstNumber(tropopause)).toBe(listedKm);
    const demoFlight = program.flights.find((flight) => flight.title === title);
    expect(demoFlight, `demo flight titled "${title}"`).toBeDefined();
    const truthKm = (demoFlight?.truth.tropopauseAltitudeM ?? Number.NaN) / 1000;
    // [D] the generator's own tropopause for this flight; the lapse-rate (WMO) definition finds it
    // within a bin or two of the kink, well inside 1 km
    expect(Math.abs(firstNumber(tropopause) - truthKm)).toBeLessThan(1);

    const cautions = page.getByRole("complementary", { name: "Cautions" });
    await expect.poll(() => cautions.innerText()).toContain("not a weather forecast or a flight-safety decision");
    expect(await page.getByRole("link", { name: /^Download / }).getAttribute("href")).toMatch(/^\/api\/v1\/flights\/[^/]+\/raw$/);

    await saveScreenshot(page, "flight");
    expect(pageErrors).toEqual([]);
  });
});

describe("archive table", () => {
  it("sorts by a click on a column header (a second click reverses), fits 1280 px, and shows the page size in use", async () => {
    const { page } = session;
    await page.goto("/flights?pageSize=30");
    // The size in use is the one selected, even when a link asks for one the list does not offer.
    expect(await page.getByLabel("Rows per page").inputValue()).toBe("30");
    // Every column, Surface inversion and QC included, is visible without a sideways scroll.
    const fits = await page.getByRole("region", { name: "Flights" }).evaluate((el) => el.scrollWidth <= el.clientWidth);
    expect(fits).toBe(true);

    const header = page.getByRole("region", { name: "Flights" }).getByRole("columnheader", { name: "Tropopause (km)" });
    await header.getByRole("link").click();
    await page.waitForURL(/[?&]sort=tropopause-desc\b/);
    expect(await page.getByRole("columnheader", { name: "Tropopause (km)" }).getAttribute("aria-sort")).toBe("descending");
    const column = await columnIndex(page, "Flights", "Tropopause (km)");
    const descending = await numbersIn(column);
    expect(descending.length).toBeGreaterThan(1);
    expect(descending).toEqual([...descending].sort((a, b) => b - a));

    await page.getByRole("columnheader", { name: "Tropopause (km)" }).getByRole("link").click();
    await page.waitForURL(/[?&]sort=tropopause-asc\b/);
    expect(await page.getByRole("columnheader", { name: "Tropopause (km)" }).getAttribute("aria-sort")).toBe("ascending");
    const ascending = await numbersIn(column);
    expect(ascending).toEqual([...ascending].sort((a, b) => a - b));
    expect(await page.getByLabel("Sort by").inputValue()).toBe("tropopause-asc");
    // The filter survives the click.
    expect(page.url()).toMatch(/[?&]pageSize=30\b/);

    async function numbersIn(index: number): Promise<number[]> {
      const rows = dataRows(page, "Flights");
      const values: number[] = [];
      for (let i = 0; i < (await rows.count()); i++) {
        const text = await cellText(rows.nth(i), index);
        if (/^\d/.test(text)) values.push(firstNumber(text));
      }
      return values;
    }
  });
});
