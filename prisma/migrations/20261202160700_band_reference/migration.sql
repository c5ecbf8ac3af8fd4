-- Every band names its height reference. A band layer keeps the band as asked (limits above their
-- reference, and the ground AGL limits were measured from), and every layer the range its fit used.
-- ADD COLUMN rather than a table rebuild: a rebuild would drop the archive_revision triggers on "FlightSummary".
ALTER TABLE "LayerStat" ADD COLUMN "fittedBaseM" REAL;
ALTER TABLE "LayerStat" ADD COLUMN "fittedTopM" REAL;
ALTER TABLE "LayerStat" ADD COLUMN "bandReference" TEXT;
ALTER TABLE "LayerStat" ADD COLUMN "bandBaseM" REAL;
ALTER TABLE "LayerStat" ADD COLUMN "bandTopM" REAL;
ALTER TABLE "LayerStat" ADD COLUMN "groundElevationM" REAL;
ALTER TABLE "FlightSummary" ADD COLUMN "groundElevationM" REAL;

-- Existing band layers were asked above mean sea level (the only meaning bands had); their fitted range is
-- unknown until re-analysis. Existing runs measured from their site's elevation.
UPDATE "LayerStat" SET "bandReference" = 'msl', "bandBaseM" = "baseM", "bandTopM" = "topM" WHERE "kind" = 'band';
UPDATE "FlightSummary" SET "groundElevationM" = (SELECT "elevationM" FROM "Site" WHERE "Site"."id" = "FlightSummary"."siteId");
