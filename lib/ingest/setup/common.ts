/**
 * What every setup item's module shares: the database handle type, the default actor, the
 * transaction helper, the audit row and the conflict error.
 */
import type { Db, DbTransaction } from "../../db/index.ts";
import { Prisma } from "../../db/index.ts";
import type { Actor } from "../store.ts";

export type DbLike = Db | DbTransaction;

export const SETUP_ACTOR: Actor = { userId: null, label: "setup" };

/**
 * Runs `work` in a transaction: the caller's, when `db` already is one, otherwise a new one. A
 * create and its audit row are written together or not at all.
 */
export async function inTransaction<T>(db: DbLike, work: (tx: DbTransaction) => Promise<T>): Promise<T> {
  const client = db as Partial<Pick<Db, "$transaction">>;
  return typeof client.$transaction === "function" ? (db as Db).$transaction(work) : work(db as DbTransaction);
}

export async function auditCreate(tx: DbTransaction, actor: Actor, schoolId: string | null, entityType: string, entityId: string, details: Prisma.InputJsonValue) {
  await tx.auditEvent.create({ data: { actorUserId: actor.userId, actorLabel: actor.label, schoolId, action: `${entityType}.create`, entityType, entityId, details } });
}

export async function audit(db: DbLike, actor: Actor, schoolId: string | null, action: string, entityType: string, entityId: string, details: Prisma.InputJsonValue) {
  await db.auditEvent.create({ data: { actorUserId: actor.userId, actorLabel: actor.label, schoolId, action, entityType, entityId, details } });
}

/** Raised when a write would contradict stored setup (a sensor in two payloads at once, another school's id…). */
export class SetupConflictError extends Error {
  constructor(message: string, readonly field: string | null = null) {
    super(message);
    this.name = "SetupConflictError";
  }
}

