-- A restore commits one row here before it writes and deletes it in the transaction that writes the
-- archive; a row left behind marks an interrupted restore (npm start and the CLI refuse to serve).
-- CreateTable
CREATE TABLE "RestoreMarker" (
    "id" TEXT NOT NULL PRIMARY KEY,
    "backupFile" TEXT NOT NULL,
    "startedAtUtc" DATETIME NOT NULL
);
