/** The Audit page's address: bad or unknown values are dropped and named; links keep the filter. */
import { describe, expect, test } from "vitest";
import { auditHref, parseAuditFilter } from "../../lib/query/audit-params.ts";

describe("parseAuditFilter", () => {
  test("keeps good values, drops and names an unknown parameter and a bad date", () => {
    const { filter, problems } = parseAuditFilter({ school: "s1", actor: "x", from: "2026-02-30x", page: "3" });
    expect(filter).toMatchObject({ school: "s1", page: 3 });
    expect(filter.from).toBeUndefined();
    expect(problems).toHaveLength(2);
    expect(problems).toContain('unknown parameter "actor"; the parameters are school, person, action, from, to, demo, page (ignored)');
    expect(problems).toContain("from: from must be a date (YYYY-MM-DD) (ignored)");
    expect(parseAuditFilter({ to: "2026-02-30" }).problems).toEqual(["to: to must be a date (YYYY-MM-DD) (ignored)"]);
  });

  test("a reversed range drops from and says so", () => {
    const { filter, problems } = parseAuditFilter({ from: "2026-03-05", to: "2026-03-01" });
    expect(filter).toMatchObject({ to: "2026-03-01", page: 1 });
    expect(filter.from).toBeUndefined();
    expect(problems).toEqual(["from: from must not be after to (ignored)"]);
  });

  test("blank form fields mean no filter", () => {
    expect(parseAuditFilter({ school: "", person: "", action: "", from: "", to: "", demo: "" })).toEqual({ filter: { page: 1 }, problems: [] });
  });
});

describe("auditHref", () => {
  test("carries the filter, applies changes, leaves out blanks and page 1", () => {
    const { filter } = parseAuditFilter({ school: "s1", action: "flight.upload", page: "2" });
    expect(auditHref(filter)).toBe("/audit?school=s1&action=flight.upload&page=2");
    expect(auditHref(filter, { page: "1" })).toBe("/audit?school=s1&action=flight.upload");
    expect(auditHref(filter, { demo: "show", from: "2026-03-03", to: "2026-03-03", page: undefined })).toBe("/audit?school=s1&action=flight.upload&from=2026-03-03&to=2026-03-03&demo=show");
    expect(auditHref(parseAuditFilter({}).filter)).toBe("/audit");
  });
});
