-- Exactly one current analysis run (and summary) per flight, enforced by the database.
-- First repair flights left with several current runs by concurrent re-analyses: keep the newest.
UPDATE "AnalysisRun" SET "isCurrent" = 0
WHERE "isCurrent" = 1 AND EXISTS (
  SELECT 1 FROM "AnalysisRun" newer
  WHERE newer."flightId" = "AnalysisRun"."flightId" AND newer."isCurrent" = 1
    AND (newer."createdAt" > "AnalysisRun"."createdAt" OR (newer."createdAt" = "AnalysisRun"."createdAt" AND newer."id" > "AnalysisRun"."id"))
);
UPDATE "FlightSummary" SET "isCurrent" = 0
WHERE "isCurrent" = 1 AND NOT EXISTS (SELECT 1 FROM "AnalysisRun" r WHERE r."id" = "FlightSummary"."runId" AND r."isCurrent" = 1);

-- Enforced by triggers on SQLite (Prisma's SQLite introspection cannot read partial indexes through the wasm
-- engine; SQLite runs one writer at a time, so a check before each write is as strong as a unique index).
CREATE TRIGGER "AnalysisRun_one_current_per_flight_insert" BEFORE INSERT ON "AnalysisRun"
WHEN NEW."isCurrent" = 1 AND EXISTS (SELECT 1 FROM "AnalysisRun" WHERE "flightId" = NEW."flightId" AND "isCurrent" = 1)
BEGIN SELECT RAISE(ABORT, 'one current analysis run per flight'); END;
CREATE TRIGGER "AnalysisRun_one_current_per_flight_update" BEFORE UPDATE OF "isCurrent", "flightId" ON "AnalysisRun"
WHEN NEW."isCurrent" = 1 AND EXISTS (SELECT 1 FROM "AnalysisRun" WHERE "flightId" = NEW."flightId" AND "isCurrent" = 1 AND "id" <> NEW."id")
BEGIN SELECT RAISE(ABORT, 'one current analysis run per flight'); END;
CREATE TRIGGER "FlightSummary_one_current_per_flight_insert" BEFORE INSERT ON "FlightSummary"
WHEN NEW."isCurrent" = 1 AND EXISTS (SELECT 1 FROM "FlightSummary" WHERE "flightId" = NEW."flightId" AND "isCurrent" = 1)
BEGIN SELECT RAISE(ABORT, 'one current summary per flight'); END;
CREATE TRIGGER "FlightSummary_one_current_per_flight_update" BEFORE UPDATE OF "isCurrent", "flightId" ON "FlightSummary"
WHEN NEW."isCurrent" = 1 AND EXISTS (SELECT 1 FROM "FlightSummary" WHERE "flightId" = NEW."flightId" AND "isCurrent" = 1 AND "id" <> NEW."id")
BEGIN SELECT RAISE(ABORT, 'one current summary per flight'); END;
