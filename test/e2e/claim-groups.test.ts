import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openSession, type E2eSession } from "../support/e2e-browser.ts";
import { dataRows } from "../support/e2e-page.ts";

// The global set-up loaded the invented demo archive (seed/), which flies every site in every season.

let session: E2eSession;

beforeAll(async () => {
  session = await openSession();
});

afterAll(async () => {
  await session?.close();
});

describe("claims on any grouping", () => {
  it("checks a site-against-site claim from the form, with a season × site cross-table", async () => {
    const { page } = session;
    // Two site ids and names from the API's per-site grouping.
    const bySite = (await (await page.request.get("/api/v1/climatology?groupBy=site&flights=none")).json()) as { groups: Array<{ key: string; label: string; n: number }> };
    const [s1, s2] = bySite.groups;
    if (!s1 || !s2) throw new Error("the demo archive needs two sites");

    await page.goto("/climatology");
    await page.getByRole("radio", { name: "Group A differs from group B" }).check();
    await page.getByLabel("Claim direction", { exact: true }).selectOption("two-sided");
    await page.getByLabel("Group A", { exact: true }).fill(`site:${s1.key}`);
    await page.getByLabel("Group B", { exact: true }).fill(`site:${s2.key}`);
    await page.getByRole("button", { name: "Run query" }).click();
    await expect.poll(() => page.url()).toMatch(/groupA=site%3A/);

    const verdict = page.getByRole("status", { name: "Verdict" });
    await expect.poll(() => verdict.innerText()).toContain(s1.label);
    expect(await verdict.innerText()).toContain(s2.label);
    const rows = dataRows(page, "Groups");
    const labels: string[] = [];
    const counts: number[] = [];
    for (let i = 0; i < (await rows.count()); i++) {
      labels.push((await rows.nth(i).getByRole("rowheader").innerText()).trim());
      counts.push(Number((await rows.nth(i).getByRole("cell").first().innerText()).trim()));
    }
    expect(labels.slice(0, 2)).toEqual([`A: ${s1.label}`, `B: ${s2.label}`]);
    expect(counts.slice(0, 2)).toEqual([s1.n, s2.n]);

    // The cross-table of season × site.
    await page.goto("/climatology?groupBy=season&crossBy=site");
    const cross = page.getByRole("region", { name: "Cross-table" });
    await expect.poll(() => cross.innerText()).toContain(s1.label);
    expect(await cross.innerText()).toMatch(/n = \d+/);
  });
});
