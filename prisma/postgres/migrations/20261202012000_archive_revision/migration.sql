-- CreateTable
CREATE TABLE "ArchiveRevision" (
    "id" INTEGER NOT NULL DEFAULT 1,
    "revision" INTEGER NOT NULL DEFAULT 0,

    CONSTRAINT "ArchiveRevision_pkey" PRIMARY KEY ("id")
);

-- The one counter row.
INSERT INTO "ArchiveRevision" ("id", "revision") VALUES (1, 0);

-- Every change to what climatology reads bumps the counter inside the same transaction
-- (lib/query/climatology-cache.ts compares it before reusing a cached result). Statement-level:
-- one bump per statement, however many rows it touches.
CREATE FUNCTION "lapsebank_bump_archive_revision"() RETURNS trigger LANGUAGE plpgsql AS $$
BEGIN
    UPDATE "ArchiveRevision" SET "revision" = "revision" + 1 WHERE "id" = 1;
    RETURN NULL;
END
$$;

CREATE TRIGGER "Flight_archive_revision" AFTER INSERT OR UPDATE OR DELETE ON "Flight"
    FOR EACH STATEMENT EXECUTE FUNCTION "lapsebank_bump_archive_revision"();

CREATE TRIGGER "FlightSummary_archive_revision" AFTER INSERT OR UPDATE OR DELETE ON "FlightSummary"
    FOR EACH STATEMENT EXECUTE FUNCTION "lapsebank_bump_archive_revision"();

CREATE TRIGGER "AnalysisRun_archive_revision" AFTER INSERT OR UPDATE OR DELETE ON "AnalysisRun"
    FOR EACH STATEMENT EXECUTE FUNCTION "lapsebank_bump_archive_revision"();

CREATE TRIGGER "Site_archive_revision" AFTER INSERT OR UPDATE OR DELETE ON "Site"
    FOR EACH STATEMENT EXECUTE FUNCTION "lapsebank_bump_archive_revision"();

CREATE TRIGGER "School_archive_revision" AFTER INSERT OR UPDATE OR DELETE ON "School"
    FOR EACH STATEMENT EXECUTE FUNCTION "lapsebank_bump_archive_revision"();
