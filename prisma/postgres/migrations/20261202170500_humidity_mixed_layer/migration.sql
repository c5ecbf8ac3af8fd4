-- Humidity, freezing level and mixed-layer quantities of analysis 1.3.0 (REFERENCE.md §14–§19).
-- Older runs keep NULL here until they are re-analysed.
ALTER TABLE "FlightSummary" ADD COLUMN "surfaceDewPointK" DOUBLE PRECISION,
ADD COLUMN "lclAltitudeM" DOUBLE PRECISION,
ADD COLUMN "precipitableWaterMm" DOUBLE PRECISION,
ADD COLUMN "saturatedLayerCount" INTEGER,
ADD COLUMN "lowestSaturatedLayerBaseM" DOUBLE PRECISION,
ADD COLUMN "freezingLevelAltitudeM" DOUBLE PRECISION,
ADD COLUMN "freezingLevelCount" INTEGER,
ADD COLUMN "mixedLayerHeightM" DOUBLE PRECISION,
ADD COLUMN "mixedLayerHeightGradientM" DOUBLE PRECISION;
