/** Schools: the one schema and the audited create. */
import { z } from "zod";
import type { Actor } from "../store.ts";
import { auditCreate, inTransaction, SETUP_ACTOR, type DbLike } from "./common.ts";

export const schoolInputSchema = z.object({
  name: z.string().trim().min(2).max(120),
  slug: z.string().trim().regex(/^[a-z0-9][a-z0-9-]{1,60}$/, "Use lower-case letters, digits and dashes").optional(),
});

export function slugify(name: string): string {
  return name.toLowerCase().normalize("NFKD").replace(/[^a-z0-9]+/g, "-").replace(/^-+|-+$/g, "").slice(0, 60) || "school";
}

/** Creates a school (audited as school.create). */
export async function createSchool(db: DbLike, input: z.input<typeof schoolInputSchema>, actor: Actor = SETUP_ACTOR) {
  const data = schoolInputSchema.parse(input);
  return inTransaction(db, async (tx) => {
    const school = await tx.school.create({ data: { name: data.name, slug: data.slug ?? slugify(data.name) } });
    await auditCreate(tx, actor, school.id, "school", school.id, { name: school.name, slug: school.slug });
    return school;
  });
}
