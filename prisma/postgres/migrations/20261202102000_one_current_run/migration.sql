-- Exactly one current analysis run (and summary) per flight, enforced by the database.
-- First repair flights left with several current runs by concurrent re-analyses: keep the newest.
UPDATE "AnalysisRun" SET "isCurrent" = FALSE
WHERE "isCurrent" = TRUE AND EXISTS (
  SELECT 1 FROM "AnalysisRun" newer
  WHERE newer."flightId" = "AnalysisRun"."flightId" AND newer."isCurrent" = TRUE
    AND (newer."createdAt" > "AnalysisRun"."createdAt" OR (newer."createdAt" = "AnalysisRun"."createdAt" AND newer."id" > "AnalysisRun"."id"))
);
UPDATE "FlightSummary" SET "isCurrent" = FALSE
WHERE "isCurrent" = TRUE AND NOT EXISTS (SELECT 1 FROM "AnalysisRun" r WHERE r."id" = "FlightSummary"."runId" AND r."isCurrent" = TRUE);

-- Partial unique indexes (not expressible in the Prisma schema; written by hand).
CREATE UNIQUE INDEX "AnalysisRun_one_current_per_flight" ON "AnalysisRun"("flightId") WHERE "isCurrent" = TRUE;
CREATE UNIQUE INDEX "FlightSummary_one_current_per_flight" ON "FlightSummary"("flightId") WHERE "isCurrent" = TRUE;
