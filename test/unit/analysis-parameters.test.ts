import { describe, expect, test } from "vitest";
import { resolveAnalysisParameters } from "../../lib/analysis/index";
import { DEFAULT_ANALYSIS_PARAMETERS } from "../../lib/analysis/types";
import { analysisParametersSchema } from "../../lib/ingest/schemas";

describe("fixed bands in the program parameters", () => {
  test("each band names its reference; one without is above mean sea level (what bands meant before)", () => {
    const parsed = analysisParametersSchema.parse({ ...DEFAULT_ANALYSIS_PARAMETERS, fixedBandsM: [{ baseM: 0, topM: 2000, reference: "agl" }, { baseM: 2000, topM: 5000 }] });
    expect(parsed.fixedBandsM).toEqual([{ baseM: 0, topM: 2000, reference: "agl" }, { baseM: 2000, topM: 5000, reference: "msl" }]);
  });

  test("an unknown reference or a top below its base is refused with a plain message", () => {
    const bad = analysisParametersSchema.safeParse({ ...DEFAULT_ANALYSIS_PARAMETERS, fixedBandsM: [{ baseM: 0, topM: 2000, reference: "ground" }] });
    expect(bad.success).toBe(false);
    expect(bad.error?.issues[0]?.message).toMatch(/agl \(above ground level\) or msl/);
    expect(analysisParametersSchema.safeParse({ ...DEFAULT_ANALYSIS_PARAMETERS, fixedBandsM: [{ baseM: 2000, topM: 0, reference: "msl" }] }).success).toBe(false);
  });

  test("the analysis drops a band without a valid reference, with a warning", () => {
    const bands = [{ baseM: 0, topM: 2000, reference: "agl" }, { baseM: 0, topM: 2000, reference: "sideways" }] as unknown as typeof DEFAULT_ANALYSIS_PARAMETERS.fixedBandsM;
    const { parameters, warnings } = resolveAnalysisParameters({ fixedBandsM: bands });
    expect(parameters.fixedBandsM).toEqual([{ baseM: 0, topM: 2000, reference: "agl" }]);
    expect(warnings.map((w) => w.code)).toEqual(["invalid-parameter"]);
  });
});
