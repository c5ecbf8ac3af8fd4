-- The launch time typed with the upload, kept apart from the launch stored from the file's clock: it dates a
-- clock-time file on re-analysis and is what the file's clock is checked against. Null where none was typed
-- (and for flights stored before it was kept).
-- ADD COLUMN rather than a table rebuild: a rebuild would drop the archive_revision triggers on "Flight".
ALTER TABLE "Flight" ADD COLUMN "typedLaunchAtUtc" DATETIME;
