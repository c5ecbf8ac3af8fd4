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
