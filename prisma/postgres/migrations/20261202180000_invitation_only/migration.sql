-- A program setting: new accounts only through a valid invitation link (the first account excepted).
ALTER TABLE "ProgramSettings" ADD COLUMN "invitationOnly" BOOLEAN NOT NULL DEFAULT false;
