import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeFlightFile } from "../support/flight-files.ts";
import { openSession, saveScreenshot, type E2eSession } from "../support/e2e-browser.ts";
import { dataRows, factValue, firstNumber } from "../support/e2e-page.ts";

// The demo archive (seed/demo-program.ts) gives Southwind Bay College the layout "Comma logger,
// counts" (layout A, the one makeFlightFile writes) on payload Pod One, whose 10 mV/K sensor
// LV10-22-5530 is calibrated from 2022-10-01 to 2024-10-01. The launch below sits inside that
// period, before the demo's first flight and outside JJA, so the archive test's counts hold
// whichever file runs first.
const SCHOOL = "Southwind Bay College";
const SITE = /^Wattlegrove Paddock\b/;
const LAYOUT = "Comma logger, counts";
const PAYLOAD = "Pod One";
const SENSOR_SERIAL = "LV10-22-5530";
const LAUNCH_LOCAL_INPUT = "2022-11-15T07:30:00"; // read as UTC by the form

// An invented flight (makeFlightFile, layout A). A comment line of fixed width with the run's
// time makes the bytes new on every run, so a long-lived server (LAPSEBANK_E2E_BASE_URL) never
// sees a duplicate, while the data and every byte offset stay the same. With this seed the
// preview's 64 KB window ends in the middle of a data row (checked below).
const UPLOAD_SEED = 30302;
const PREVIEW_WINDOW_BYTES = 64 * 1024;
const flight = makeFlightFile({ seed: UPLOAD_SEED });
const goodText = `# e2e upload ${String(Date.now()).padStart(16, "0")}\n${flight.text}`;
const goodBytes = new TextEncoder().encode(goodText);
const tempDir = fs.mkdtempSync(path.join(os.tmpdir(), "lapsebank-e2e-upload-"));
const goodFile = path.join(tempDir, "e2e-flight.csv");
fs.writeFileSync(goodFile, goodBytes);

// The same flight with text in the temperature field of one data row.
const lines = goodText.split("\n");
const HEADER_LINE = 2; // 1-based: line 1 is the comment
const BAD_LINE = 40;
const headerFields = (lines[HEADER_LINE - 1] ?? "").split(",");
const BAD_COLUMN = headerFields.indexOf("temp_counts") + 1; // [D] 1-based position of the temperature column
const badFields = (lines[BAD_LINE - 1] ?? "").split(",");
badFields[BAD_COLUMN - 1] = "warm";
lines[BAD_LINE - 1] = badFields.join(",");
const badFile = path.join(tempDir, "e2e-malformed.csv");
fs.writeFileSync(badFile, lines.join("\n"));

let session: E2eSession;

beforeAll(async () => {
  session = await openSession();
});

afterAll(async () => {
  await session?.close();
  fs.rmSync(tempDir, { recursive: true, force: true });
});

async function archiveTotal(): Promise<number> {
  const response = await session.context.request.get("/api/v1/flights?pageSize=1");
  expect(response.status()).toBe(200);
  const body = (await response.json()) as { paging: { total: number } };
  return body.paging.total;
}

/** Fills the upload form for Southwind Bay College's layout-A logger and chooses `file`. */
async function fillUploadForm(file: string): Promise<void> {
  const { page } = session;
  await page.goto("/upload");
  await expect.poll(() => page.getByRole("heading", { level: 1 }).innerText()).toBe("Upload flights");
  await page.getByLabel("School", { exact: true }).selectOption({ label: SCHOOL });
  const site = page.getByLabel("Launch site");
  const siteOption = (await site.getByRole("option").allInnerTexts()).find((text) => SITE.test(text));
  expect(siteOption, "Wattlegrove Paddock among the sites").toBeDefined();
  await site.selectOption({ label: siteOption ?? "" });
  await page.getByLabel("Logger layout").selectOption({ label: LAYOUT });
  await page.getByLabel(/^Payload/).selectOption({ label: PAYLOAD });
  const sensor = page.getByLabel("Temperature sensor");
  const sensorOption = (await sensor.getByRole("option").allInnerTexts()).find((text) => text.startsWith(SENSOR_SERIAL));
  expect(sensorOption, `sensor ${SENSOR_SERIAL} among the sensors`).toBeDefined();
  await sensor.selectOption({ label: sensorOption ?? "" });
  await page.getByLabel("Launch time (UTC)").fill(LAUNCH_LOCAL_INPUT);
  await page.getByLabel("Strict: refuse the file").check();
  await page.getByLabel("Logger files").setInputFiles(file);
}

describe("upload through the web form", () => {
  it("stores a new flight file and lands on its page with the tropopause height", async () => {
    const { page, pageErrors } = session;
    const before = await archiveTotal();
    await fillUploadForm(goodFile);

    // The preview reads the first rows with the chosen layout before anything is stored.
    const previewRows = dataRows(page, "Parsed rows");
    await expect.poll(() => previewRows.count(), { timeout: 15_000 }).toBeGreaterThan(0);
    const firstPreviewLine = await previewRows.first().getByRole("cell").first().innerText();
    expect(firstPreviewLine.trim()).toBe(String(HEADER_LINE + 1)); // [D] the first data row follows the header
    // Every row of this file is well formed, so the preview must not report unreadable rows: a
    // preview of the first 64 KB must not take the row cut at the window's end for a bad row.
    expect(goodBytes.length).toBeGreaterThan(PREVIEW_WINDOW_BYTES);
    expect(goodBytes[PREVIEW_WINDOW_BYTES - 1], "the window ends inside a row").not.toBe(0x0a);
    expect(await page.getByText(/could not be read/).count()).toBe(0);
    await saveScreenshot(page, "upload-preview");

    await page.getByRole("button", { name: "Upload", exact: true }).click();
    await page.waitForURL(/\/flights\/[^/?]+$/, { timeout: 60_000 });
    await saveScreenshot(page, "uploaded-flight");

    await expect.poll(() => page.getByRole("heading", { level: 1 }).innerText()).toMatch(/^Wattlegrove Paddock\b/);
    expect((await factValue(page, "School").innerText()).trim()).toBe(SCHOOL);
    expect((await factValue(page, "Launch (UTC)").innerText()).trim()).toBe("2022-11-15 07:30 UTC");
    const tropopause = (await factValue(page, "First tropopause (MSL)").innerText()).trim();
    expect(tropopause).toMatch(/^\d+\.\d{2} km\b/);
    // [D] makeFlightFile puts the tropopause at 11 000 m; the lapse-rate (WMO) definition finds it
    // within a bin or two of the kink, well inside 0.5 km
    expect(Math.abs(firstNumber(tropopause) * 1000 - flight.truth.tropopauseAltitudeM)).toBeLessThan(500);

    const lapseRate = (await factValue(page, "Tropospheric lapse rate ± SE").innerText()).trim();
    // [D] makeFlightFile's troposphere falls at 6.5 K/km (plus 0.1 K sensor noise)
    expect(Math.abs(firstNumber(lapseRate) - flight.truth.lapseRateKPerKm)).toBeLessThan(0.3);
    expect(lapseRate).toMatch(/ K\/km$/);

    // [D] the page shows what the store holds: the API's value rounded to 2 decimals of a km
    const id = new URL(page.url()).pathname.split("/").pop() ?? "";
    const detail = await session.context.request.get(`/api/v1/flights/${id}`);
    expect(detail.status()).toBe(200);
    const body = (await detail.json()) as { flight: { currentRun: { summary: { tropopauseAltitudeM: number | null } | null } | null } };
    const storedM = body.flight.currentRun?.summary?.tropopauseAltitudeM ?? null;
    expect(storedM).not.toBeNull();
    expect(tropopause.startsWith(`${((storedM ?? 0) / 1000).toFixed(2)} km`)).toBe(true);

    // The raw bytes come back unchanged.
    const raw = await session.context.request.get(`/api/v1/flights/${id}/raw`);
    expect(Buffer.from(await raw.body()).equals(Buffer.from(goodBytes))).toBe(true);

    expect(await archiveTotal()).toBe(before + 1);
    expect(pageErrors).toEqual([]);
  });

  it("refuses a malformed file with an error naming its line and column, and stores nothing", async () => {
    const { page } = session;
    const before = await archiveTotal();
    await fillUploadForm(badFile);
    const badName = path.basename(badFile);
    const where = `${badName}, line ${BAD_LINE}, column ${BAD_COLUMN} ("temp_counts")`;

    // The preview (lenient, so it lists bad rows) already points at the field.
    await expect.poll(() => page.getByText(where).count(), { timeout: 15_000 }).toBeGreaterThan(0);

    await page.getByRole("button", { name: "Upload", exact: true }).click();
    const progress = dataRows(page, "Upload progress");
    await expect.poll(() => progress.first().innerText(), { timeout: 60_000 }).toMatch(/\bfailed\b/);
    const row = await progress.first().innerText();
    expect(row).toContain(where);
    expect(row).toContain('"warm"');
    await saveScreenshot(page, "upload-malformed");

    expect(new URL(page.url()).pathname).toBe("/upload");
    expect(await archiveTotal()).toBe(before);
    expect(session.pageErrors).toEqual([]);
  });
});
