import { afterAll, beforeAll, expect, test } from "vitest";
import { openSession, type E2eSession } from "../support/e2e-browser.ts";

// The Audit page on the demo archive (local mode, no accounts): the demo loader's events are one row
// per day, "Show them" lists them, and an unknown parameter is named on the page.
let session: E2eSession;

beforeAll(async () => {
  session = await openSession();
});

afterAll(async () => {
  await session?.close();
});

test("demo loader days fold, unfold, and a bad parameter is named", async () => {
  const { page } = session;
  await page.goto("/audit");
  await expect(page.getByRole("heading", { name: "Audit log", level: 1 }).isVisible()).resolves.toBe(true);
  const status = await page.getByRole("status").filter({ hasText: "Page 1 of" }).textContent();
  expect(status).toMatch(/by the demo loader \(one row per day\)\. Page 1 of \d+\./);
  const showThem = page.getByRole("link", { name: "Show them" }).first();
  await showThem.click();
  await page.waitForURL(/demo=show/);
  await expect(page.getByRole("cell", { name: "demo loader", exact: true }).first().isVisible()).resolves.toBe(true);
  await page.goto("/audit?bogus=1");
  await expect(page.getByRole("alert").filter({ hasText: "Some filter values were not understood" }).textContent()).resolves.toContain('unknown parameter "bogus"');
  expect(session.pageErrors).toEqual([]);
});
