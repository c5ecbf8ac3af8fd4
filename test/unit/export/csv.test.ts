import { parse } from "csv-parse/sync";
import fc from "fast-check";
import { describe, expect, test } from "vitest";
import { csvCell, csvLine, formatNumberCell, guardTextCell, unguardTextCell } from "../../../lib/export/csv.ts";

describe("CSV-injection guard", () => {
  // Triggers: = + - @ tab CR at the start of a cell [P: OWASP "CSV Injection"]; ' is guarded so the guard can be undone.
  test.each([
    ["=HYPERLINK(\"x\")", "'=HYPERLINK(\"x\")"],
    ["+1+1", "'+1+1"],
    ["-2+3", "'-2+3"],
    ["@SUM(A1)", "'@SUM(A1)"],
    ["\tcmd", "'\tcmd"],
    ["\rcmd", "'\rcmd"],
    ["'quoted", "''quoted"],
    ["plain title", "plain title"],
    ["a=b", "a=b"],
    ["", ""],
  ])("%j → %j", (text, guarded) => {
    expect(guardTextCell(text)).toBe(guarded);
    expect(unguardTextCell(guarded)).toBe(text);
  });

  test("guard then unguard gives back any text", () => {
    fc.assert(fc.property(fc.string(), (text) => unguardTextCell(guardTextCell(text)) === text));
  });

  test("a guarded cell never starts with a trigger", () => {
    fc.assert(fc.property(fc.string(), (text) => !/^[=+\-@\t\r]/.test(guardTextCell(text))));
  });

  test("text cells are guarded, numbers are not", () => {
    expect(csvCell("-5 K")).toBe("'-5 K");
    expect(csvCell(-5)).toBe("-5");
    // JSON text that starts with a trigger is guarded too (a string JSON value starts with a quote, so it is not).
    expect(csvCell({ json: -1 })).toBe("'-1");
    expect(csvCell({ json: "=x" })).toBe("\"\"\"=x\"\"\"");
  });
});

describe("numbers at full precision", () => {
  test("shortest round-trip text reads back to the same double", () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (x) => Object.is(Number(formatNumberCell(x)), x)),
      { numRuns: 2000 },
    );
  });
  test.each([
    [0.1 + 0.2, "0.30000000000000004"], // [D] IEEE 754 double nearest 0.1 + 0.2
    [269.54921859068884, "269.54921859068884"],
    [-0, "-0"],
    [1e21, "1e+21"], // [D] ECMAScript Number::toString switches to exponent form at 1e21
    [5e-324, "5e-324"],
  ])("%d → %s", (x, text) => expect(formatNumberCell(x)).toBe(text));
  test("non-finite values are written as missing", () => {
    expect(formatNumberCell(Number.NaN)).toBe("");
    expect(formatNumberCell(Number.POSITIVE_INFINITY)).toBe("");
  });
});

describe("CSV records", () => {
  test("quotes, commas, line breaks and JSON survive a standard CSV parser", () => {
    const values = ["a,b", "say \"hi\"", "two\nlines", "=1+2", null, 3.5, true, new Date("2024-07-10T06:01:00.123Z"), { json: { k: [1, "x,y"] } }] as const;
    const line = csvLine([...values]);
    expect(line.endsWith("\r\n")).toBe(true);
    const [row] = parse(line, { relax_column_count: false }) as string[][];
    expect(row).toEqual(["a,b", "say \"hi\"", "two\nlines", "'=1+2", "", "3.5", "true", "2024-07-10T06:01:00.123Z", "{\"k\":[1,\"x,y\"]}"]);
  });
});
