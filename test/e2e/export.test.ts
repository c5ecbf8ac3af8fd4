import { unzipSync } from "fflate";
import { parse } from "csv-parse/sync";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openSession, type E2eSession } from "../support/e2e-browser.ts";
import { frictionlessValidator } from "../unit/export/frictionless.ts";

// The global set-up loaded the invented demo archive (seed/).

let session: E2eSession;

beforeAll(async () => {
  session = await openSession();
});

afterAll(async () => {
  await session?.close();
});

/** The Export panel's download button when the page has the panel; else a link built from the page's own query link. */
async function startDownload(query: string) {
  const { page } = session;
  const download = page.waitForEvent("download");
  const button = page.getByRole("button", { name: "Download export" });
  if ((await button.count()) > 0) {
    await button.click();
  } else {
    await page.evaluate((href) => {
      const a = document.createElement("a");
      a.href = href;
      a.textContent = "export";
      document.body.append(a);
      a.click();
    }, `/api/v1/export?source=climatology&format=package&licence=CC0-1.0&${query}`);
  }
  return download;
}

describe("export", () => {
  it("downloads a data package from a Climatology query and its contents match the page", async () => {
    const { page } = session;
    // The demo archive's invented flights, also after another test uploaded a real one (then `auto` leaves them out).
    const query = "metric=tropospheric-lapse-rate&groupBy=season&invented=include";
    await page.goto(`/climatology?${query}`);
    const status = await page.getByRole("status").first().innerText();
    const flightCount = Number(/(\d+) flights? in/.exec(status)?.[1]);
    expect(flightCount).toBeGreaterThan(50);

    const download = await startDownload(query);
    expect(download.suggestedFilename()).toMatch(/^lapsebank-climatology-\d{8}-\d{6}\.zip$/);
    const path = await download.path();
    const { readFileSync } = await import("node:fs");
    const files = unzipSync(new Uint8Array(readFileSync(path)));
    const text = (name: string) => new TextDecoder().decode(files[name]);

    expect(Object.keys(files)).toEqual(expect.arrayContaining(["datapackage.json", "CITATION.cff", "README.md", "data/flights.csv", "data/levels.csv", "data/layers.csv", "data/runs.csv", "data/query-values.csv"]));
    const descriptor = JSON.parse(text("datapackage.json")) as { lapsebank: { query: { source: string; parameters: Record<string, string> } } };
    expect(frictionlessValidator()(descriptor)).toBe(true);
    expect(descriptor.lapsebank.query.source).toBe("climatology");
    expect(descriptor.lapsebank.query.parameters).toMatchObject({ metric: "tropospheric-lapse-rate", groupBy: "season" });

    // As many flights as the page counted, each with its value; every flight row present.
    const values = parse(text("data/query-values.csv"), { columns: true }) as Array<Record<string, string>>;
    expect(values.length).toBe(flightCount);
    const flights = parse(text("data/flights.csv"), { columns: true }) as Array<Record<string, string>>;
    expect(new Set(flights.map((f) => f.flightId))).toEqual(new Set(values.map((v) => v.flightId)));
    expect(text("CITATION.cff")).toMatch(/^cff-version: 1\.2\.0$/m);
    expect(session.pageErrors).toEqual([]);
  });
});
