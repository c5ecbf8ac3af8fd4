/** The program-wide analysis parameters. */
import { z } from "zod";
import { Prisma } from "../../db/index.ts";
import type { Actor } from "../store.ts";
import { audit, SETUP_ACTOR, type DbLike } from "./common.ts";
import { analysisParametersSchema } from "../schemas.ts";

// --- program parameters -------------------------------------------------------------------------

/**
 * Sets the program-wide analysis parameters (id 1 of ProgramSettings). Every later run records the
 * parameters it used, so changing them never alters a stored run; reprocessing applies them.
 */
export async function setProgramParameters(db: DbLike, input: z.input<typeof analysisParametersSchema>, actor: Actor = SETUP_ACTOR) {
  const parameters = analysisParametersSchema.parse(input);
  const json = parameters as unknown as Prisma.InputJsonValue;
  await db.programSettings.upsert({ where: { id: 1 }, create: { id: 1, analysisParameters: json }, update: { analysisParameters: json } });
  await audit(db, actor, null, "program.parameters", "program", "1", json);
  return parameters;
}

// --- who may sign up ----------------------------------------------------------------------------

/**
 * Turns "accounts by invitation only" on or off (id 1 of ProgramSettings; a program that never
 * saved parameters keeps the built-in ones). The first account can always be made.
 */
export async function setInvitationOnly(db: DbLike, invitationOnly: boolean, actor: Actor = SETUP_ACTOR): Promise<boolean> {
  // `{}`: no parameters of its own, so the built-in defaults stay in use (store.ts getProgramParameters).
  await db.programSettings.upsert({ where: { id: 1 }, create: { id: 1, analysisParameters: {}, invitationOnly }, update: { invitationOnly } });
  await audit(db, actor, null, "program.invitation-only", "program", "1", { invitationOnly });
  return invitationOnly;
}
