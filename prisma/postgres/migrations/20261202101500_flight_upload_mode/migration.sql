-- How each flight's raw file was read when stored ("strict" | "lenient"); re-analysis reads it the same way.
ALTER TABLE "Flight" ADD COLUMN "uploadMode" TEXT NOT NULL DEFAULT 'strict';

-- Existing flights: those whose upload skipped rows were certainly lenient.
UPDATE "Flight" SET "uploadMode" = 'lenient'
WHERE EXISTS (SELECT 1 FROM "AnalysisRun" r WHERE r."flightId" = "Flight"."id" AND r."reason" = 'upload' AND r."skippedRowCount" > 0);
