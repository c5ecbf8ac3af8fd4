-- Humidity, freezing level and mixed-layer quantities of analysis 1.3.0 (REFERENCE.md §14–§19).
-- Older runs keep NULL here until they are re-analysed.
-- ADD COLUMN rather than a table rebuild: a rebuild would drop the archive_revision triggers.
ALTER TABLE "FlightSummary" ADD COLUMN "surfaceDewPointK" REAL;
ALTER TABLE "FlightSummary" ADD COLUMN "lclAltitudeM" REAL;
ALTER TABLE "FlightSummary" ADD COLUMN "precipitableWaterMm" REAL;
ALTER TABLE "FlightSummary" ADD COLUMN "saturatedLayerCount" INTEGER;
ALTER TABLE "FlightSummary" ADD COLUMN "lowestSaturatedLayerBaseM" REAL;
ALTER TABLE "FlightSummary" ADD COLUMN "freezingLevelAltitudeM" REAL;
ALTER TABLE "FlightSummary" ADD COLUMN "freezingLevelCount" INTEGER;
ALTER TABLE "FlightSummary" ADD COLUMN "mixedLayerHeightM" REAL;
ALTER TABLE "FlightSummary" ADD COLUMN "mixedLayerHeightGradientM" REAL;
