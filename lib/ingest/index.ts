export { IngestFailure, formatIssue, type IngestIssue } from "./errors.ts";
export { loggerLayoutSpecSchema, type LoggerLayoutSpec } from "./layout.ts";
export { parseLoggerFile, decodeLoggerText, type ParsedLoggerFile, type ParseMode } from "./parse.ts";
export { suggestLayout, type LayoutSuggestion } from "./suggest-layout.ts";
export { prepareAnalysis, sha256Hex, directCalibrationFor } from "./pipeline.ts";
export { ingestFlightFile, writeAnalysisRun, getProgramParameters, findCalibrationAt, type IngestResult, type IngestRequest, type Actor } from "./store.ts";
export { uploadMetadataSchema, temperatureCalibrationSchema, analysisParametersSchema, visibilitySchema, type UploadMetadata } from "./schemas.ts";
export * from "./setup.ts";
export { flightsAnalysedWithOtherSite, reprocessFlight, reprocessFlights, selectFlights, type ReprocessOutcome, type ReprocessSelection, type RunChange } from "./reprocess.ts";
