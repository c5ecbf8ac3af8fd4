-- CreateTable
CREATE TABLE "ArchiveRevision" (
    "id" INTEGER NOT NULL PRIMARY KEY AUTOINCREMENT DEFAULT 1,
    "revision" INTEGER NOT NULL DEFAULT 0
);

-- The one counter row.
INSERT INTO "ArchiveRevision" ("id", "revision") VALUES (1, 0);

-- Every change to what climatology reads bumps the counter inside the same transaction
-- (lib/query/climatology-cache.ts compares it before reusing a cached result).
CREATE TRIGGER "Flight_archive_revision_insert" AFTER INSERT ON "Flight"
BEGIN
    UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1;
END;

CREATE TRIGGER "Flight_archive_revision_update" AFTER UPDATE ON "Flight"
BEGIN
    UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1;
END;

CREATE TRIGGER "Flight_archive_revision_delete" AFTER DELETE ON "Flight"
BEGIN
    UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1;
END;

CREATE TRIGGER "FlightSummary_archive_revision_insert" AFTER INSERT ON "FlightSummary"
BEGIN
    UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1;
END;

CREATE TRIGGER "FlightSummary_archive_revision_update" AFTER UPDATE ON "FlightSummary"
BEGIN
    UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1;
END;

CREATE TRIGGER "FlightSummary_archive_revision_delete" AFTER DELETE ON "FlightSummary"
BEGIN
    UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1;
END;

CREATE TRIGGER "AnalysisRun_archive_revision_insert" AFTER INSERT ON "AnalysisRun"
BEGIN
    UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1;
END;

CREATE TRIGGER "AnalysisRun_archive_revision_update" AFTER UPDATE ON "AnalysisRun"
BEGIN
    UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1;
END;

CREATE TRIGGER "AnalysisRun_archive_revision_delete" AFTER DELETE ON "AnalysisRun"
BEGIN
    UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1;
END;

CREATE TRIGGER "Site_archive_revision_insert" AFTER INSERT ON "Site"
BEGIN
    UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1;
END;

CREATE TRIGGER "Site_archive_revision_update" AFTER UPDATE ON "Site"
BEGIN
    UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1;
END;

CREATE TRIGGER "Site_archive_revision_delete" AFTER DELETE ON "Site"
BEGIN
    UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1;
END;

CREATE TRIGGER "School_archive_revision_insert" AFTER INSERT ON "School"
BEGIN
    UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1;
END;

CREATE TRIGGER "School_archive_revision_update" AFTER UPDATE ON "School"
BEGIN
    UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1;
END;

CREATE TRIGGER "School_archive_revision_delete" AFTER DELETE ON "School"
BEGIN
    UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1;
END;
