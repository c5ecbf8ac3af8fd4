-- A restore commits one row here before it writes and deletes it in the transaction that writes the
-- archive; a row left behind marks an interrupted restore (npm start and the CLI refuse to serve).
-- CreateTable
CREATE TABLE "RestoreMarker" (
    "id" TEXT NOT NULL,
    "backupFile" TEXT NOT NULL,
    "startedAtUtc" TIMESTAMP(3) NOT NULL,

    CONSTRAINT "RestoreMarker_pkey" PRIMARY KEY ("id")
);
