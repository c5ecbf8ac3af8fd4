import { describe, expect, test } from "vitest";
import { parameterRecordSchema, readStoredJson, removedCountsSchema, storedWarningsSchema } from "../../lib/query/stored-json.ts";
import { describeChange } from "../../app/_components/setup/change-words.ts";

describe("stored JSON columns are parsed, not cast", () => {
  test("well-formed values come back as they are", () => {
    const warnings = [{ code: "few-levels", message: "Only 12 levels" }];
    expect(readStoredJson(storedWarningsSchema, warnings, "QC notes")).toEqual({ value: warnings, problem: null });
    expect(readStoredJson(removedCountsSchema, { gpsJumps: 2, preLaunch: 0 }, "removed-row counts")).toEqual({ value: { gpsJumps: 2, preLaunch: 0 }, problem: null });
  });

  test("a value of another shape gives null and a message naming what could not be read", () => {
    const read = readStoredJson(storedWarningsSchema, [{ code: "few-levels" }], "QC notes");
    expect(read.value).toBeNull();
    expect(read.problem?.code).toBe("stored-json-unreadable");
    expect(read.problem?.message).toMatch(/^The stored QC notes of this run could not be read \(.+ at 0\.message\)\.$/);
    expect(readStoredJson(removedCountsSchema, { gpsJumps: "2" }, "removed-row counts").value).toBeNull();
    expect(readStoredJson(parameterRecordSchema, [1, 2], "parameters").value).toBeNull();
  });

  test("the run comparison says so in words", () => {
    const problem = readStoredJson(parameterRecordSchema, "garbled", "parameters").problem;
    const words = describeChange({
      tropopauseAltitudeDeltaM: null, troposphericLapseRateDeltaKPerKm: null, surfaceTemperatureDeltaK: null,
      calibrationChanged: false, analysisVersionChanged: null, unreadable: problem ? [problem.message] : [],
    });
    expect(words).toHaveLength(1);
    expect(words[0]).toMatch(/^The stored parameters of this run could not be read/);
  });
});
