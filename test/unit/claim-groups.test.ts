import { describe, expect, test } from "vitest";
import { claimGroupConditions, climatologySearchParams, flightInClaimGroup, parseClaimGroup, parseClimatologyQuery } from "../../lib/query/climatology-params";

describe("parseClaimGroup", () => {
  test.each([
    { text: "summer", conditions: [{ column: "seasonName", equals: "summer" }] },
    { text: "Oct-Nov", conditions: [{ column: "month", in: [10, 11] }] },
    { text: "site:abc", conditions: [{ column: "siteId", in: ["abc"] }] },
    { text: "school:s1,s2", conditions: [{ column: "schoolId", in: ["s1", "s2"] }] },
    { text: "year:2024", conditions: [{ column: "year", in: [2024] }] },
    { text: "year:2023-2025", conditions: [{ column: "year", in: [2023, 2024, 2025] }] },
    { text: "hour:6-12", conditions: [{ column: "localHour", fromInclusive: 6, toExclusive: 12 }] },
    { text: "sunrise:-1.5-3", conditions: [{ column: "hoursAfterSunrise", fromInclusive: -1.5, toExclusive: 3 }] },
    {
      text: "site:abc; summer; hour:6-12",
      conditions: [{ column: "siteId", in: ["abc"] }, { column: "seasonName", equals: "summer" }, { column: "localHour", fromInclusive: 6, toExclusive: 12 }],
    },
  ])("$text", ({ text, conditions }) => {
    expect(claimGroupConditions(parseClaimGroup(text))).toEqual(conditions);
  });

  test.each(["site:", "hour:12-6", "hour:6-30", "year:24", "sunrise:abc", "site:a b", "nonsense"])("refuses %s", (text) => {
    expect(() => parseClaimGroup(text)).toThrow();
  });

  test("flightInClaimGroup: ranges are half-open, a filter set needs every condition", () => {
    const row = { siteId: "abc", schoolId: "s1", year: 2024, month: 7, seasonName: "summer", localHour: 12, hoursAfterSunrise: null };
    expect(flightInClaimGroup(parseClaimGroup("hour:6-12"), row)).toBe(false);
    expect(flightInClaimGroup(parseClaimGroup("hour:12-18"), row)).toBe(true);
    expect(flightInClaimGroup(parseClaimGroup("site:abc; summer"), row)).toBe(true);
    expect(flightInClaimGroup(parseClaimGroup("site:abc; winter"), row)).toBe(false);
    expect(flightInClaimGroup(parseClaimGroup("sunrise:0-3"), row)).toBe(false); // no sunrise that day
  });
});

describe("claim groups in the query", () => {
  test("site-vs-site was refused before and now parses; the link keeps the groups", () => {
    const parsed = parseClimatologyQuery({ claim: "two-group", groupA: "site:abc", groupB: "site:def" });
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    expect(parsed.query.groupA?.parts[0]).toMatchObject({ kind: "site", ids: ["abc"] });
    const link = climatologySearchParams(parsed.query);
    expect(link.get("groupA")).toBe("site:abc");
    expect(link.get("groupB")).toBe("site:def");
  });

  test.each([
    { groupA: "site:abc", groupB: "site:abc,def", message: /share site abc/ },
    { groupA: "year:2023-2024", groupB: "year:2024", message: /share year 2024/ },
    { groupA: "hour:6-12", groupB: "hour:10-14", message: /share hours 10–12/ },
    { groupA: "JJA", groupB: "Aug-Sep", message: /share Aug/ },
  ])("groups that certainly share flights are refused: $groupA / $groupB", ({ groupA, groupB, message }) => {
    const parsed = parseClimatologyQuery({ claim: "two-group", groupA, groupB });
    expect(parsed.ok).toBe(false);
    if (!parsed.ok) expect(parsed.fieldErrors.groupB?.join(" ")).toMatch(message);
  });

  test("adjacent hour ranges do not overlap; a tolerance needs a two-sided one-sample claim", () => {
    expect(parseClimatologyQuery({ claim: "two-group", groupA: "hour:6-12", groupB: "hour:12-18" }).ok).toBe(true);
    expect(parseClimatologyQuery({ claim: "one-sample", claimValue: "6.5", claimTolerance: "0.3" }).ok).toBe(true);
    const wrong = parseClimatologyQuery({ claim: "one-sample", claimValue: "6.5", claimTolerance: "0.3", claimSide: "greater" });
    expect(wrong.ok).toBe(false);
    expect(parseClimatologyQuery({ claim: "one-sample", claimValue: "6.5", claimTolerance: "0" }).ok).toBe(false);
  });
});
