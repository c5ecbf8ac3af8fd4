-- Every band names its height reference. A band layer keeps the band as asked (limits above their
-- reference, and the ground AGL limits were measured from), and every layer the range its fit used.
ALTER TABLE "LayerStat" ADD COLUMN "fittedBaseM" DOUBLE PRECISION;
ALTER TABLE "LayerStat" ADD COLUMN "fittedTopM" DOUBLE PRECISION;
ALTER TABLE "LayerStat" ADD COLUMN "bandReference" TEXT;
ALTER TABLE "LayerStat" ADD COLUMN "bandBaseM" DOUBLE PRECISION;
ALTER TABLE "LayerStat" ADD COLUMN "bandTopM" DOUBLE PRECISION;
ALTER TABLE "LayerStat" ADD COLUMN "groundElevationM" DOUBLE PRECISION;
ALTER TABLE "FlightSummary" ADD COLUMN "groundElevationM" DOUBLE PRECISION;

-- Existing band layers were asked above mean sea level (the only meaning bands had); their fitted range is
-- unknown until re-analysis. Existing runs measured from their site's elevation.
UPDATE "LayerStat" SET "bandReference" = 'msl', "bandBaseM" = "baseM", "bandTopM" = "topM" WHERE "kind" = 'band';
UPDATE "FlightSummary" SET "groundElevationM" = (SELECT "elevationM" FROM "Site" WHERE "Site"."id" = "FlightSummary"."siteId");
