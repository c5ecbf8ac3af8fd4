-- Demo flights stored before the demo loader marked them: mark them invented ("synthetic").
-- The marker is twofold: the flight belongs to one of the demo program's schools (name and slug as
-- seed/demo-program.ts generates them) and its flight.upload audit row was written by the demo loader.
-- A real flight uploaded into a demo school has another actor and stays real.
UPDATE "Flight" SET "synthetic" = TRUE
WHERE "synthetic" = FALSE
  AND "schoolId" IN (
    SELECT s."id" FROM "School" s
    WHERE (s."name" = 'Brackenmere Upper School' AND s."slug" = 'brackenmere-upper-school')
       OR (s."name" = 'Quillon Ridge High School' AND s."slug" = 'quillon-ridge-high-school')
       OR (s."name" = 'Southwind Bay College' AND s."slug" = 'southwind-bay-college')
  )
  AND "id" IN (
    SELECT a."entityId" FROM "AuditEvent" a
    WHERE a."action" = 'flight.upload' AND a."entityType" = 'flight' AND a."actorLabel" = 'demo loader'
  );
