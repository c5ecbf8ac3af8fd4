import { readFileSync } from "node:fs";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import packageJson from "../../package.json" with { type: "json" };
import { openSession, type E2eSession } from "../support/e2e-browser.ts";
import { dataRows } from "../support/e2e-page.ts";

// The global set-up loaded the invented demo archive (seed/).

let session: E2eSession;

beforeAll(async () => {
  session = await openSession();
});

afterAll(async () => {
  await session?.close();
});

/** PNG signature and IHDR width and height (PNG specification, ISO/IEC 15948 §5.2 and §11.2.2) [P]. */
function pngSize(bytes: Buffer): { width: number; height: number } {
  expect([...bytes.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
  expect(bytes.subarray(12, 16).toString("latin1")).toBe("IHDR");
  return { width: bytes.readUInt32BE(16), height: bytes.readUInt32BE(20) };
}

describe("figures", () => {
  it("downloads the flight profile as SVG (caption as text) and as PNG at print size", async () => {
    const { page } = session;
    await page.goto("/flights");
    const firstFlight = dataRows(page, "Flights").getByRole("link").first();
    const flightTitle = (await firstFlight.innerText()).trim();
    await firstFlight.click();
    await page.waitForURL(/\/flights\/[^/?]+$/);
    await page.locator("svg.recharts-surface").first().waitFor();

    const svgButton = page.getByRole("button", { name: /as SVG$/ }).first();
    const svgDownload = page.waitForEvent("download");
    await svgButton.click();
    const svgFile = await svgDownload;
    expect(svgFile.suggestedFilename()).toMatch(/-temperature-profile\.svg$/);
    const svgText = readFileSync(await svgFile.path(), "utf8");

    // Well-formed XML: the browser's own XML parser reports no error; collect every <text> element's text.
    const parsed = await page.evaluate((text) => {
      const doc = new DOMParser().parseFromString(text, "image/svg+xml");
      const error = doc.getElementsByTagName("parsererror")[0]?.textContent ?? null;
      const root = doc.documentElement;
      const caption = Array.from(doc.querySelectorAll("g.figure-caption text")).map((t) => t.textContent ?? "");
      const all = Array.from(doc.getElementsByTagName("text")).map((t) => t.textContent ?? "");
      return { error, rootName: root.localName, rootNs: root.namespaceURI, viewBox: root.getAttribute("viewBox"), caption, all };
    }, svgText);
    expect(parsed.error).toBeNull();
    expect(parsed.rootName).toBe("svg");
    expect(parsed.rootNs).toBe("http://www.w3.org/2000/svg");
    expect(parsed.viewBox).toMatch(/^0 0 \d+ \d+$/);
    const caption = parsed.caption.join(" ");
    expect(caption).toContain("Temperature against altitude");
    expect(caption).toContain(`Flight: ${flightTitle}`);
    expect(caption).toMatch(/n = \d+ ascent levels?/);
    expect(caption).toContain(`Lapsebank ${packageJson.version}`);
    expect(caption).toContain("Licence: Creative Commons Attribution 4.0 (CC-BY-4.0)");
    // The chart's own labels and the legend stay text too.
    expect(parsed.all).toContain("Temperature (°C)");
    expect(parsed.all).toContain("Ascent");

    const pngDownload = page.waitForEvent("download");
    await page.getByRole("button", { name: /as PNG$/ }).first().click();
    const pngFile = await pngDownload;
    expect(pngFile.suggestedFilename()).toMatch(/-temperature-profile\.png$/);
    const size = pngSize(readFileSync(await pngFile.path()));
    expect(size.width).toBeGreaterThanOrEqual(2000);
    expect(size.height).toBeGreaterThan(560 * 3 - 1);

    expect(session.pageErrors).toEqual([]);
  });
});
