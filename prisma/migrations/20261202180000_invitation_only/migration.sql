-- A program setting: new accounts only through a valid invitation link (the first account excepted).
-- ADD COLUMN rather than a table rebuild: a rebuild would drop the archive_revision triggers.
ALTER TABLE "ProgramSettings" ADD COLUMN "invitationOnly" BOOLEAN NOT NULL DEFAULT false;
