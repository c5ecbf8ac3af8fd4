/**
 * The setup items' creates and their schemas, one module per item under ./setup/ (kept as one import
 * path for the callers that use it).
 */
export { schoolInputSchema, slugify, createSchool } from "./setup/school.ts";
export { siteInputSchema, createSite } from "./setup/site.ts";
export { payloadInputSchema, createPayload } from "./setup/payload.ts";
export { sensorInputSchema, createSensor } from "./setup/sensor.ts";
export { calibrationInputSchema, OverlappingCalibrationError, createCalibration, updateCalibration } from "./setup/calibration.ts";
export { layoutInputSchema, createLayout } from "./setup/layout.ts";
