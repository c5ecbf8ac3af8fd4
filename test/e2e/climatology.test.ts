import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openSession, saveScreenshot, type E2eSession } from "../support/e2e-browser.ts";
import { dataRows } from "../support/e2e-page.ts";

// The global set-up loaded the invented demo archive (seed/), which flies every site in every season.

let session: E2eSession;
/** Responses with an error status, except the browser's own favicon request (no icon is shipped). */
const failedResponses: string[] = [];

beforeAll(async () => {
  session = await openSession();
  session.page.on("response", (response) => {
    if (response.status() >= 400 && !new URL(response.url()).pathname.startsWith("/favicon")) failedResponses.push(`${response.status()} ${response.url()}`);
  });
});

afterAll(async () => {
  await session?.close();
});

/** Page errors other than the favicon 404 the browser logs as "Failed to load resource". */
function realPageErrors(): string[] {
  return session.pageErrors.filter((e) => !/Failed to load resource: the server responded with a status of 404/.test(e));
}

async function groupRows(): Promise<Array<{ label: string; n: number }>> {
  const rows = dataRows(session.page, "Groups");
  const out: Array<{ label: string; n: number }> = [];
  for (let i = 0; i < (await rows.count()); i++) {
    const row = rows.nth(i);
    out.push({ label: (await row.getByRole("rowheader").innerText()).trim(), n: Number((await row.getByRole("cell").first().innerText()).trim()) });
  }
  return out;
}

describe("climatology", () => {
  it("shows the default query grouped by season, with the charts", async () => {
    const { page } = session;
    await page.goto("/climatology");
    await expect.poll(() => page.getByRole("heading", { level: 1 }).innerText()).toBe("Climatology");
    const rows = await groupRows();
    expect(rows.map((r) => r.label)).toEqual(["winter", "spring", "summer", "autumn", "All groups"]);
    expect(rows.every((r) => r.n > 0)).toBe(true);
    // Each flight point in the charts links to its flight page.
    await expect.poll(() => page.locator("a.chart-point-link").count()).toBeGreaterThan(0);
    expect(await page.locator("a.chart-point-link").first().getAttribute("href")).toMatch(/^\/flights\/[^/]+$/);
  });

  it("checks the claim 'summer band lapse rates are steeper than Oct–Nov' and gets the same result after a reload", async () => {
    const { page } = session;
    await page.goto("/climatology");
    await page.getByLabel("Metric", { exact: true }).selectOption("band-lapse-rate");
    await page.getByLabel("Band base (km)").fill("1");
    await page.getByLabel("Band top (km)").fill("6");
    await page.getByLabel("Band heights measured from").selectOption("msl");
    await page.getByRole("radio", { name: "Group A differs from group B" }).check();
    await page.getByLabel("Claim direction", { exact: true }).selectOption("greater");
    await page.getByLabel("Group A", { exact: true }).fill("summer");
    await page.getByLabel("Group B", { exact: true }).fill("Oct-Nov");
    await page.getByRole("button", { name: "Run query" }).click();
    await page.waitForURL(/[?&]groupA=summer\b/);
    const url = page.url();
    expect(url).toMatch(/[?&]groupB=Oct-Nov\b/);
    expect(url).toMatch(/[?&]claim=two-group\b/);

    const rows = await groupRows();
    expect(rows.map((r) => r.label)).toEqual(["A: summer", "B: Oct–Nov", "All groups"]);
    expect(rows[0]?.n).toBeGreaterThan(0);
    expect(rows[1]?.n).toBeGreaterThan(0);
    // [D] both groups together make up the whole
    expect(rows[2]?.n).toBe((rows[0]?.n ?? 0) + (rows[1]?.n ?? 0));

    const verdict = page.getByRole("status", { name: "Verdict" });
    const verdictText = (await verdict.innerText()).trim();
    expect(verdictText).toMatch(/^Verdict: (Supported|Not shown|Cannot be tested)\./);
    expect(verdictText).toContain("summer");
    expect(verdictText).toContain("Oct–Nov");
    // The flights the band cannot cover are counted, not dropped silently.
    await expect.poll(() => page.getByLabel("Excluded flights").innerText()).toMatch(/flights? excluded: no coverage of 1–6 km/);
    // The box-and-points chart is drawn with both groups in its legend.
    const chart = page.locator("figure.chart").first();
    await expect.poll(() => chart.locator("svg.recharts-surface").count()).toBeGreaterThan(0);
    await expect.poll(() => chart.innerText()).toMatch(/A: summer \(n = \d+\)/);
    expect(await chart.innerText()).toMatch(/B: Oct–Nov \(n = \d+\)/);
    await saveScreenshot(page, "climatology-claim");

    // The API answers the same query with the same numbers.
    const search = new URL(url).search;
    const api = (await (await page.request.get(`/api/v1/climatology${search}`)).json()) as { groups: Array<{ label: string; n: number }>; claim: { verdict: string } };
    expect(api.groups.map((g) => ({ label: g.label, n: g.n }))).toEqual(rows.slice(0, 2));
    expect(verdictText).toContain(api.claim.verdict);

    // Reloading the shared URL gives the same result.
    await page.reload();
    expect(await groupRows()).toEqual(rows);
    expect((await page.getByRole("status", { name: "Verdict" }).innerText()).trim()).toBe(verdictText);
    expect(await page.getByLabel("Group B", { exact: true }).inputValue()).toBe("Oct-Nov");
    expect(realPageErrors()).toEqual([]);
    expect(failedResponses).toEqual([]);
  });

  it("explains bad input on the page and answers 422 from the API", async () => {
    const { page } = session;
    await page.goto("/climatology?metric=band-lapse-rate&bandBaseKm=6&bandTopKm=1");
    await expect.poll(() => page.getByRole("alert").first().innerText()).toMatch(/band base \(6 km\) must lie below its top \(1 km\)/);
    expect(await page.getByLabel("Band top (km)").getAttribute("aria-invalid")).toBe("true");
    const response = await page.request.get("/api/v1/climatology?site=no-such-site");
    expect(response.status()).toBe(422);
    expect(((await response.json()) as { error: { message: string } }).error.message).toMatch(/unknown site id/);
  });
});
