/**
 * The setup items' corrections, mounts, deletes, parameters, calibration fit and layout preview, one
 * module per item under ./setup/ (kept as one import path for the callers that use it).
 */
export { SetupConflictError } from "./setup/common.ts";
export { siteUpdateSchema, updateSite } from "./setup/site.ts";
export { payloadUpdateSchema, updatePayload } from "./setup/payload.ts";
export { sensorUpdateSchema, updateSensor, sensorMountInputSchema, mountSensor } from "./setup/sensor.ts";
export { SETUP_ITEM_KINDS, type SetupItemKind, type SetupItemFacts, findSetupItem, setupItemUses, deleteSetupItem } from "./setup/delete.ts";
export { layoutUpdateSchema, updateLayout, LAYOUT_PREVIEW_BYTES, type LayoutPreview, previewLayoutSample } from "./setup/layout.ts";
export { setInvitationOnly, setProgramParameters } from "./setup/parameters.ts";
export {
  calibrationPointSchema, calibrationFitInputSchema, type CalibrationFitCoefficient, type CalibrationFitResult, CalibrationFitError, fitCalibrationPoints,
} from "./setup/calibration.ts";
