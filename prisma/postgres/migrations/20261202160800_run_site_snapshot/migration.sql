-- The site each analysis run was analysed with (latitude, longitude, elevation, time zone): a run whose
-- snapshot differs from the site now is out of date, and re-analysis is offered.
ALTER TABLE "AnalysisRun" ADD COLUMN "siteLatitudeDeg" DOUBLE PRECISION,
ADD COLUMN "siteLongitudeDeg" DOUBLE PRECISION,
ADD COLUMN "siteElevationM" DOUBLE PRECISION,
ADD COLUMN "siteTimeZone" TEXT;

-- Existing runs: the latitude each was analysed with is in its own summary; longitude, elevation and time zone
-- were not recorded, so they are taken from the site as it is now.
UPDATE "AnalysisRun" SET
  "siteLatitudeDeg" = COALESCE(
    (SELECT fs."latitudeDeg" FROM "FlightSummary" fs WHERE fs."runId" = "AnalysisRun"."id"),
    (SELECT s."latitudeDeg" FROM "Flight" f JOIN "Site" s ON s."id" = f."siteId" WHERE f."id" = "AnalysisRun"."flightId")
  ),
  "siteLongitudeDeg" = (SELECT s."longitudeDeg" FROM "Flight" f JOIN "Site" s ON s."id" = f."siteId" WHERE f."id" = "AnalysisRun"."flightId"),
  "siteElevationM" = (SELECT s."elevationM" FROM "Flight" f JOIN "Site" s ON s."id" = f."siteId" WHERE f."id" = "AnalysisRun"."flightId"),
  "siteTimeZone" = (SELECT s."timeZone" FROM "Flight" f JOIN "Site" s ON s."id" = f."siteId" WHERE f."id" = "AnalysisRun"."flightId");
