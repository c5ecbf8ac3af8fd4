import "server-only";
import { getDb, type Db } from "../db/index.ts";
import { countUsers, isInvitationOnly } from "../auth/accounts.ts";

/** The signed-in person's schools, roles and API tokens (never the token secrets). */
export async function getAccount(userId: string, db: Db = getDb()) {
  const user = await db.user.findUnique({
    where: { id: userId },
    select: {
      id: true, email: true, displayName: true, isProgramAdmin: true, createdAt: true,
      memberships: { select: { role: true, school: { select: { id: true, name: true } } } },
      apiTokens: { orderBy: { createdAt: "desc" }, select: { id: true, name: true, scopes: true, createdAt: true, lastUsedAt: true, revokedAt: true, school: { select: { name: true } } } },
    },
  });
  return user;
}

export async function hasAnyAccount(db: Db = getDb()): Promise<boolean> {
  return (await countUsers(db)) > 0;
}

/** Whether new accounts need an invitation link (the program setting; the first account never does). */
export async function signUpNeedsInvitation(db: Db = getDb()): Promise<boolean> {
  return isInvitationOnly(db);
}

export async function listSchoolMembers(schoolId: string, db: Db = getDb()) {
  const school = await db.school.findUnique({
    where: { id: schoolId },
    select: { id: true, name: true, memberships: { orderBy: { createdAt: "asc" }, select: { role: true, user: { select: { id: true, email: true, displayName: true } } } } },
  });
  return school;
}

export async function listSchools(db: Db = getDb()) {
  return db.school.findMany({ orderBy: { name: "asc" }, select: { id: true, name: true } });
}

/** Soft-deleted flights an admin may restore. */
export async function listDeletedFlights(schoolIds: string[] | null, db: Db = getDb()) {
  return db.flight.findMany({
    where: { deletedAt: { not: null }, ...(schoolIds === null ? {} : { schoolId: { in: schoolIds } }) },
    orderBy: { deletedAt: "desc" },
    select: { id: true, title: true, deletedAt: true, school: { select: { name: true } } },
  });
}
