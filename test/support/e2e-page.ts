import type { Locator, Page } from "playwright-core";

/** The data rows (rows that hold cells, not column headers) of the table in the region named `regionName`. */
export function dataRows(page: Page, regionName: string): Locator {
  return page.getByRole("region", { name: regionName }).getByRole("row").filter({ has: page.getByRole("cell") });
}

/** The text of one cell of a row, by the column's position among the row's cells. */
export async function cellText(row: Locator, index: number): Promise<string> {
  return (await row.getByRole("cell").nth(index).innerText()).trim();
}

/** Index of the column whose header reads `header` in the table of region `regionName`. */
export async function columnIndex(page: Page, regionName: string, header: string): Promise<number> {
  const headers = await page.getByRole("region", { name: regionName }).getByRole("columnheader").allInnerTexts();
  const index = headers.findIndex((text) => text.replace(/\s+/g, " ").trim() === header);
  if (index < 0) throw new Error(`no column "${header}" in ${regionName}; columns are: ${headers.join(" | ")}`);
  return index;
}

/** The value shown beside a term of a description list ("First tropopause" → "11.02 km, −56.3 °C"). */
export function factValue(page: Page, term: string): Locator {
  return page
    .getByRole("term")
    .filter({ hasText: new RegExp(`^\\s*${escapeRegExp(term)}\\s*$`) })
    .locator("xpath=following-sibling::*[1]");
}

/** First number in a text such as "11.02 km" (a minus sign may be U+2212). */
export function firstNumber(text: string): number {
  const match = /[-−]?\d+(?:\.\d+)?/.exec(text);
  if (!match) throw new Error(`no number in "${text}"`);
  return Number(match[0].replace("−", "-"));
}

export function escapeRegExp(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\]/g, "\\$&");
}
