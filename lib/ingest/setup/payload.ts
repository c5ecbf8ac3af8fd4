/** Payloads: the one schema per write and the audited create and correction. */
import { z } from "zod";
import type { Actor } from "../store.ts";
import { audit, auditCreate, inTransaction, SETUP_ACTOR, type DbLike } from "./common.ts";

export const payloadInputSchema = z.object({ schoolId: z.string().min(1), name: z.string().trim().min(1).max(120), notes: z.string().max(2000).default("") });

export const payloadUpdateSchema = payloadInputSchema.omit({ schoolId: true });

/** Creates a payload (audited as payload.create, in the same transaction). */
export async function createPayload(db: DbLike, input: z.input<typeof payloadInputSchema>, actor: Actor = SETUP_ACTOR) {
  const data = payloadInputSchema.parse(input);
  return inTransaction(db, async (tx) => {
    const payload = await tx.payload.create({ data });
    await auditCreate(tx, actor, payload.schoolId, "payload", payload.id, { name: payload.name });
    return payload;
  });
}

export async function updatePayload(db: DbLike, payloadId: string, input: z.input<typeof payloadUpdateSchema>, actor: Actor = SETUP_ACTOR) {
  const data = payloadUpdateSchema.parse(input);
  const payload = await db.payload.update({ where: { id: payloadId }, data });
  await audit(db, actor, payload.schoolId, "payload.update", "payload", payload.id, data);
  return payload;
}
