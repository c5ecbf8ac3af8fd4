import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { calibrateReading } from "../../lib/analysis/calibration.ts";
import { generateDemoProgram } from "../../seed/demo-program.ts";
import { openSession, saveScreenshot, type E2eSession } from "../support/e2e-browser.ts";
import { cellText, columnIndex, dataRows, escapeRegExp } from "../support/e2e-page.ts";

// The global set-up loaded the demo archive (seed/), so the sensor, its calibration and its flights
// below come from the same deterministic generator [D].
const program = generateDemoProgram();
const SENSOR_KEY = "capsule-a-lv-1";
const sensor = program.sensors.find((s) => s.key === SENSOR_KEY);
const calibration = sensor?.calibrations.find((c) => c.validToUtc === null);
/** [D] every demo flight of this sensor falls inside its open-ended calibration. */
const sensorFlightCount = program.flights.filter((f) => f.sensorKey === SENSOR_KEY).length;
const K0 = 273.15; // 0 °C in K, SI definition
const OFFSET_K = -0.8; // the invented field check finds the sensor 0.8 K warm at both points

/** [D] reference temperature (°C) for a raw reading: the model without correction, then 0.8 K colder. */
function referenceC(raw: number): number {
  if (!calibration) throw new Error("demo calibration missing");
  const { correction: _ignored, ...nominal } = calibration.spec;
  const t = calibrateReading(nominal, raw);
  if (!t.ok) throw new Error(`demo model cannot read ${raw}`);
  return Number((t.temperatureK + OFFSET_K - K0).toFixed(6));
}

let session: E2eSession;

beforeAll(async () => {
  session = await openSession();
});

afterAll(async () => {
  await session?.close();
});

describe("setup: calibration helper and re-analysis", () => {
  it("refuses an overlapping calibration with the clear message", async () => {
    const { page } = session;
    expect(sensor, `demo sensor ${SENSOR_KEY}`).toBeDefined();
    await page.goto("/setup/sensors");
    await dataRows(page, "Sensors").filter({ hasText: sensor?.serial ?? "?" }).getByRole("link", { name: sensor?.serial ?? "?" }).click();
    await page.waitForURL(/\/setup\/sensors\/[^/?]+/);
    await page.getByRole("link", { name: "New calibration" }).click();
    await page.waitForURL(/\/setup\/calibrations\/new\?sensor=/);
    await page.getByLabel("Valid from (UTC date)").fill("2025-03-01");
    await page.getByLabel("Method", { exact: true }).fill("two-point");
    await page.getByRole("button", { name: "Create calibration" }).click();
    const alert = page.getByRole("alert").filter({ hasText: "overlaps calibration" });
    await expect.poll(() => alert.innerText()).toMatch(/valid 2022-10-01 to open end\)\. Close that one first or choose other dates\./);
    expect(page.url()).toMatch(/\/setup\/calibrations\/new/);
  });

  it("fits a two-point correction, saves it, re-analyses a demo flight and shows the run history", async () => {
    const { page, pageErrors } = session;
    await page.goto("/setup/sensors");
    await dataRows(page, "Sensors").filter({ hasText: sensor?.serial ?? "?" }).getByRole("link", { name: sensor?.serial ?? "?" }).click();
    await page.getByRole("link", { name: `Edit the calibration valid from ${calibration?.validFromUtc.slice(0, 10) ?? "?"}` }).click();
    await page.waitForURL(/\/setup\/calibrations\/[^/?]+$/);

    // Ice bath and room temperature: two pairs of (raw counts, reference °C).
    const raws = [560, 600];
    for (const [i, raw] of raws.entries()) {
      await page.getByLabel(`Raw reading ${i + 1}`, { exact: true }).fill(String(raw));
      await page.getByLabel(`Reference temperature ${i + 1} (°C)`).fill(String(referenceC(raw)));
    }
    await page.getByRole("button", { name: "Fit", exact: true }).click();
    const coefficients = dataRows(page, "Fitted coefficients");
    await expect.poll(() => coefficients.count()).toBe(2);
    // [D] references 0.8 K below the uncorrected model at both points: gain 1, offset −0.8 K
    expect(Number(await cellText(coefficients.filter({ hasText: "gain" }), 1))).toBeCloseTo(1, 4);
    expect(Number(await cellText(coefficients.filter({ hasText: "offset" }), 1))).toBeCloseTo(OFFSET_K, 3);
    const residuals = dataRows(page, "Residuals");
    expect(await residuals.count()).toBe(2);
    for (let i = 0; i < 2; i++) expect(Math.abs(Number(await cellText(residuals.nth(i), 3)))).toBeLessThan(0.0005); // [D] two points, exact line
    await expect.poll(() => page.getByRole("img", { name: /Fitted calibration: temperature \(°C\) against reading \(ADC counts\)/ }).count()).toBe(1);
    await saveScreenshot(page, "setup-calibration-fit");

    await page.getByRole("button", { name: "Use this fit" }).click();
    await expect.poll(() => page.getByLabel("Field correction offset (K)").inputValue().then(Number)).toBeCloseTo(OFFSET_K, 6);
    expect(await page.getByLabel("Method", { exact: true }).inputValue()).toBe("two-point");
    await page.getByRole("button", { name: "Save calibration" }).click();

    // The affected flights are listed for re-analysis.
    await page.waitForURL(/\/setup\/reprocess\?calibration=/);
    const flights = dataRows(page, "Affected flights");
    await expect.poll(() => flights.count()).toBe(sensorFlightCount);
    expect(sensorFlightCount).toBeGreaterThan(0);
    const first = flights.first();
    const title = (await first.getByRole("link").first().innerText()).trim();
    await first.getByRole("button", { name: `Re-analyse ${title}` }).click();
    const statusColumn = await columnIndex(page, "Affected flights", "Status");
    await expect.poll(() => cellText(first, statusColumn), { timeout: 60_000 }).toBe("re-analysed");
    const changeColumn = await columnIndex(page, "Affected flights", "What changed");
    const change = await cellText(first, changeColumn);
    expect(change).toContain("calibration changed");
    expect(change).toMatch(/surface temperature by [−+]?\d+\.\d{2} K/);
    await expect.poll(() => page.getByRole("group", { name: "Re-analysis summary" }).innerText()).toContain("1 re-analysed, 0 already up to date, 0 failed");
    await saveScreenshot(page, "setup-reprocess");

    // The flight page shows both runs and what changed.
    await first.getByRole("link", { name: title }).click();
    await page.waitForURL(/\/flights\/[^/?]+$/);
    const runs = dataRows(page, "Run history");
    await expect.poll(() => runs.count()).toBe(2);
    const reasonColumn = await columnIndex(page, "Run history", "Reason");
    const changedColumn = await columnIndex(page, "Run history", "Changed from the run before");
    expect(await cellText(runs.nth(0), 0)).toContain("current");
    expect(await cellText(runs.nth(0), reasonColumn)).toBe(`calibration corrected for sensor ${sensor?.serial ?? "?"}`);
    expect(await cellText(runs.nth(0), changedColumn)).toContain("calibration changed");
    expect(await cellText(runs.nth(1), reasonColumn)).toBe("upload");
    expect(await cellText(runs.nth(1), changedColumn)).toBe("first run");
    await saveScreenshot(page, "setup-run-history");

    // Nothing changed since: re-analysing now reports it as up to date and adds no run.
    await page.getByRole("button", { name: "Re-analyse this flight" }).click();
    await expect.poll(() => page.getByRole("status").filter({ hasText: new RegExp(escapeRegExp("Already up to date")) }).count()).toBe(1);
    expect(await runs.count()).toBe(2);
    expect(pageErrors).toEqual([]);
  });
});

describe("setup: deleting an item entered by mistake", () => {
  it("a new site can be deleted after confirming; a site with flights offers no delete button", async () => {
    const { page, pageErrors } = session;
    await page.goto("/setup/sites");
    const form = page.getByRole("form", { name: "New site" });
    await form.getByLabel("School").selectOption({ index: 1 });
    await form.getByLabel("Site name").fill("Misspelt Feild");
    await form.getByLabel("Latitude (°, north positive)").fill("10");
    await form.getByLabel("Longitude (°, east positive)").fill("20");
    await form.getByLabel("Elevation (m above sea level)").fill("300");
    await form.getByLabel("Time zone (IANA name)").fill("UTC");
    await form.getByRole("button", { name: "Create site" }).click();
    await page.waitForURL(/\/setup\/sites\/[^/?]+\?saved=1$/);
    page.once("dialog", (dialog) => void dialog.accept());
    await page.getByRole("button", { name: "Delete this site" }).click();
    await page.waitForURL(/\/setup\/sites$/);
    await expect.poll(() => dataRows(page, "Sites").filter({ hasText: "Misspelt Feild" }).count()).toBe(0);

    // Every demo site has flights: its page says why it cannot be deleted.
    await dataRows(page, "Sites").first().getByRole("link").first().click();
    await page.waitForURL(/\/setup\/sites\/[^/?]+$/);
    expect(await page.getByRole("button", { name: "Delete this site" }).count()).toBe(0);
    expect(await page.getByText(/In use by \d+ flights?, so it cannot be deleted/).count()).toBe(1);
    expect(pageErrors).toEqual([]);
  });
});
