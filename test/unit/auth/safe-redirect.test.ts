import { describe, expect, test } from "vitest";
import { safeRedirectPath } from "../../../lib/auth/safe-redirect.ts";

describe("safeRedirectPath: only paths on this site", () => {
  test.each([
    ["/flights", "/flights"],
    ["/flights?season=JJA#top", "/flights?season=JJA#top"],
    ["/invite/abc", "/invite/abc"],
    ["/a/../flights", "/flights"],
  ])("keeps %s", (input, expected) => {
    expect(safeRedirectPath(input, "/account")).toBe(expected);
  });

  test.each([
    "/.//evil.example/phish", // normalises to //evil.example/phish (the reported open redirect)
    "/./\\evil.example",
    "//evil.example/x",
    "/\\evil.example",
    "https://evil.example/",
    "javascript:alert(1)",
    "/%2e//evil.example",
    "/\t/evil.example",
    "",
    "flights",
  ])("refuses %j", (input) => {
    const out = safeRedirectPath(input, "/account");
    expect(out).toBe("/account");
  });

  test("a refused value never yields a URL that leaves the site", () => {
    for (const input of ["/.//evil.example/phish", "/..//evil.example", "/x/..//evil.example"]) {
      const out = safeRedirectPath(input, "/account");
      expect(new URL(out, "https://lapsebank.example").host).toBe("lapsebank.example");
    }
  });
});
