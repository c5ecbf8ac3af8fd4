/**
 * Rows with more fields than the header: typical of a decimal-comma file read with a comma layout
 * ("12,5" becomes two fields). Strict mode refuses the file naming file, line and column; lenient
 * mode skips the row with its own message, as it does for other bad rows. Files are invented.
 */
import { describe, expect, test } from "vitest";
import { IngestFailure } from "@/lib/ingest/errors";
import type { LoggerLayoutSpec } from "@/lib/ingest/layout";
import { parseLoggerFile } from "@/lib/ingest/parse";

const LAYOUT: LoggerLayoutSpec = {
  name: "Invented comma layout, kelvin",
  delimiter: "comma",
  hasHeader: true,
  commentPrefix: "#",
  decimalSeparator: ".",
  columns: { time: { column: "seconds", format: "elapsed-seconds" }, altitude: { column: "alt_m", unit: "m" }, temperature: { column: "temp_k", unit: "K" } },
};
const HEADERLESS: LoggerLayoutSpec = {
  ...LAYOUT,
  hasHeader: false,
  columns: { time: { column: 1, format: "elapsed-seconds" }, altitude: { column: 2, unit: "m" }, temperature: { column: 3, unit: "K" } },
};

const rows = (count: number, format: (i: number) => string) => Array.from({ length: count }, (_, i) => format(i));
const clean = (i: number) => `${i},${200 + 5 * i}.0,${(288 - 0.0325 * i).toFixed(2)}`;
const encode = (lines: string[]) => new TextEncoder().encode(`${lines.join("\n")}\n`);

async function failureOf(promise: Promise<unknown>): Promise<IngestFailure> {
  const error = await promise.then(() => null, (e: unknown) => e);
  expect(error).toBeInstanceOf(IngestFailure);
  return error as IngestFailure;
}

describe("rows longer than the header", () => {
  test("a decimal-comma file read with a comma layout is refused at its first data row, column 4", async () => {
    // "287,5" for 287.5 K: read as temp_k = 287 and a fourth field "5"
    const lines = ["# invented", "seconds,alt_m,temp_k", ...rows(40, (i) => `${i},${200 + 5 * i},${288 - i},5`)];
    const failure = await failureOf(parseLoggerFile(encode(lines), LAYOUT, { fileName: "comma-decimal.csv", mode: "strict" }));
    expect(failure.code).toBe("bad-rows");
    const issue = failure.issues[0]!;
    expect(issue).toMatchObject({ code: "long-row", file: "comma-decimal.csv", line: 3, column: 4 });
    expect(issue.message).toContain("4 fields");
    expect(issue.message).toContain("decimal comma");
  });

  test("one long row in strict mode: refused at its line; in lenient mode: skipped with a per-row message", async () => {
    const lines = ["seconds,alt_m,temp_k", ...rows(40, (i) => (i === 17 ? `${clean(i)},9` : clean(i)))];
    const strict = await failureOf(parseLoggerFile(encode(lines), LAYOUT, { fileName: "one-long.csv", mode: "strict" }));
    expect(strict.issues).toHaveLength(1);
    expect(strict.issues[0]).toMatchObject({ code: "long-row", line: 19, column: 4 });
    const lenient = await parseLoggerFile(encode(lines), LAYOUT, { fileName: "one-long.csv", mode: "lenient" });
    expect(lenient.samples).toHaveLength(39);
    expect(lenient.skippedRows).toHaveLength(1);
    expect(lenient.skippedRows[0]).toMatchObject({ code: "long-row", line: 19, column: 4 });
  });

  test("without a header the first data row sets the count", async () => {
    const lines = rows(30, (i) => (i === 5 ? `${clean(i)},1` : clean(i)));
    const failure = await failureOf(parseLoggerFile(encode(lines), HEADERLESS, { fileName: "headerless.csv", mode: "strict" }));
    expect(failure.issues[0]).toMatchObject({ code: "long-row", line: 6, column: 4 });
    expect(failure.issues[0]?.message).toContain("first data row");
  });

  test("a trailing delimiter (empty last fields) is not a long row; short rows keep their own message", async () => {
    const trailing = ["seconds,alt_m,temp_k", ...rows(30, (i) => `${clean(i)},`)];
    const parsed = await parseLoggerFile(encode(trailing), LAYOUT, { fileName: "trailing.csv", mode: "strict" });
    expect(parsed.samples).toHaveLength(30);
    const short = ["seconds,alt_m,temp_k", ...rows(30, (i) => (i === 3 ? `${i},${200 + 5 * i}` : clean(i)))];
    const failure = await failureOf(parseLoggerFile(encode(short), LAYOUT, { fileName: "short.csv", mode: "strict" }));
    expect(failure.issues[0]).toMatchObject({ code: "short-row", line: 5, column: 3 });
  });
});
