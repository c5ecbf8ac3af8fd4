import { z } from "zod";
import type { AnalysisParameters, TemperatureCalibration } from "../analysis/types.ts";
import { DEFAULT_ANALYSIS_PARAMETERS } from "../analysis/types.ts";
import { HEIGHT_REFERENCES } from "../analysis/band-coverage.ts";
import { isStorableInstant, launchTimeProblem } from "./time-bounds.ts";

const finite = z.number().finite();
const positive = finite.positive();

/** A TemperatureCalibration as stored in Calibration.spec and accepted from forms, API and CLI. */
export const temperatureCalibrationSchema = z.object({
  input: z.enum(["counts", "volts", "millivolts", "celsius", "kelvin", "fahrenheit"]),
  adc: z.object({ bits: z.number().int().min(1).max(32), referenceV: positive, divisor: z.enum(["2^N", "2^N-1"]) }).optional(),
  sensor: z.discriminatedUnion("kind", [
    z.object({ kind: z.literal("linear-voltage"), scaleMvPerK: finite.refine((v) => v !== 0, "Scale must not be zero"), offsetV: finite }),
    z.object({
      kind: z.literal("thermistor-divider"),
      supplyV: positive,
      seriesOhm: positive,
      thermistorSide: z.enum(["high", "low"]),
      equation: z.discriminatedUnion("kind", [
        z.object({ kind: z.literal("steinhart-hart"), a: finite, b: finite, c: finite }),
        z.object({ kind: z.literal("beta"), beta: positive, r0Ohm: positive, t0K: positive }),
      ]),
    }),
    z.object({ kind: z.literal("polynomial"), coefficients: z.array(finite).min(1).max(8) }),
    z.object({ kind: z.literal("direct") }),
  ]),
  correction: z.object({ gain: positive, offsetK: finite }).optional(),
}) satisfies z.ZodType<TemperatureCalibration>;

/** Program-wide analysis parameters (defaults recorded with every run). */
export const analysisParametersSchema = z.object({
  binSizeM: z.number().min(10).max(2000),
  tropopauseSearchFloorM: z.number().min(0).max(20000),
  lagCorrection: z.object({ enabled: z.boolean(), timeConstantS: z.number().min(0).max(120) }),
  smoothingWindowS: z.number().min(0).max(600),
  hampelWindowSamples: z.number().int().min(1).max(100),
  hampelThresholdSigmas: z.number().min(1).max(20),
  maxVerticalSpeedMPerS: z.number().min(1).max(500),
  inversionMergeGapM: z.number().min(0).max(2000),
  inversionMinStrengthK: z.number().min(0).max(20),
  // A band without a reference is above mean sea level: what fixed bands meant before they named one.
  fixedBandsM: z
    .array(
      z
        .object({
          baseM: z.number(),
          topM: z.number(),
          reference: z.enum(HEIGHT_REFERENCES, { error: "Band reference must be agl (above ground level) or msl (above mean sea level)" }).default("msl"),
        })
        .refine((b) => b.topM > b.baseM, "Band top must be above its base"),
    )
    .max(20),
}) satisfies z.ZodType<AnalysisParameters>;

export const DEFAULT_PARAMETERS: AnalysisParameters = DEFAULT_ANALYSIS_PARAMETERS;

/** The program's sign-up rule (Setup form and the setup service). */
export const invitationOnlySchema = z.object({ invitationOnly: z.boolean() });

export const visibilitySchema = z.enum(["school", "program", "public"]);
export type Visibility = z.infer<typeof visibilitySchema>;

const optionalId = z.preprocess((v) => (v === "" || v === null ? undefined : v), z.string().min(1).max(64).optional());
/** An ISO 8601 date-time that names its offset: `Z` or `±hh:mm` (a bare local time would be read in the server's zone). */
const DATE_TIME_WITH_OFFSET = /^[+-]?\d{4,6}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:?\d{2})$/i;

/**
 * A launch time typed with an upload (form, API, CLI): ISO 8601 with an explicit offset, within the plausible
 * range of lib/ingest/time-bounds.ts. Date objects (from code) are checked for the range only.
 */
export const launchTimeInputSchema = z
  .union([z.date(), z.string().trim()])
  .superRefine((value, ctx) => {
    if (typeof value === "string" && !DATE_TIME_WITH_OFFSET.test(value)) {
      ctx.addIssue({
        code: "custom",
        message: `Launch time "${value.slice(0, 40)}" must be an ISO 8601 date-time with an offset, e.g. 2025-07-14T06:30:00Z or 2025-07-14T01:30:00-05:00 (a time without an offset would be read in the server's own zone)`,
      });
    }
  })
  .transform((value, ctx) => {
    const date = value instanceof Date ? value : new Date(value);
    const problem = launchTimeProblem(date);
    if (problem) {
      ctx.addIssue({ code: "custom", message: problem });
      return z.NEVER;
    }
    return date;
  });

/**
 * A date-time typed into setup (calibration validity, sensor mounts) from a form, the API or code: any
 * value z.coerce.date reads, as long as both engines store it and the app reads it back (lib/ingest/time-bounds.ts).
 */
export function storableDateInputSchema(params?: Parameters<typeof z.coerce.date>[0]) {
  return z.coerce.date(params).refine(isStorableInstant, { message: "Dates must lie in the years 0001–9999" });
}

const optionalDate = z.preprocess((v) => (v === "" || v === null || v === undefined ? undefined : v), launchTimeInputSchema.optional());

/** Metadata that accompanies an uploaded file (web form, API multipart fields, CLI options). */
export const uploadMetadataSchema = z.object({
  schoolId: z.string().min(1, "Choose a school"),
  siteId: z.string().min(1, "Choose a launch site"),
  layoutId: z.string().min(1, "Choose a logger layout"),
  payloadId: optionalId,
  sensorId: optionalId,
  calibrationId: optionalId,
  launchAtUtc: optionalDate,
  title: z.string().trim().max(200).optional(),
  notes: z.string().max(5000).optional(),
  visibility: visibilitySchema.default("program"),
  mode: z.enum(["strict", "lenient"]).default("strict"),
});
export type UploadMetadata = z.infer<typeof uploadMetadataSchema>;
