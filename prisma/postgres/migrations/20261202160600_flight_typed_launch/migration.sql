-- The launch time typed with the upload, kept apart from the launch stored from the file's clock: it dates a
-- clock-time file on re-analysis and is what the file's clock is checked against. Null where none was typed
-- (and for flights stored before it was kept).
ALTER TABLE "Flight" ADD COLUMN "typedLaunchAtUtc" TIMESTAMP(3);
