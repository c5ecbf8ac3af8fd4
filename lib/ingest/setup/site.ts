/** Launch sites: the one schema per write and the audited create and correction. */
import { z } from "zod";
import type { Actor } from "../store.ts";
import { audit, auditCreate, inTransaction, SETUP_ACTOR, type DbLike } from "./common.ts";
import { isValidTimeZone } from "../../analysis/launch-time.ts";

export const siteInputSchema = z.object({
  schoolId: z.string().min(1),
  name: z.string().trim().min(2).max(120),
  latitudeDeg: z.coerce.number().min(-90, "Latitude must be between −90 and 90°").max(90, "Latitude must be between −90 and 90°"),
  longitudeDeg: z.coerce.number().min(-180, "Longitude must be between −180 and 180°").max(180, "Longitude must be between −180 and 180°"),
  elevationM: z.coerce.number().min(-450, "Elevation below −450 m is not on land").max(6000, "Launch sites above 6000 m are not supported"),
  timeZone: z.string().trim().refine(isValidTimeZone, "Unknown IANA time zone (e.g. Europe/Berlin, America/Denver)"),
});

export const siteUpdateSchema = siteInputSchema.omit({ schoolId: true });

/** Creates a launch site (audited as site.create, in the same transaction). */
export async function createSite(db: DbLike, input: z.input<typeof siteInputSchema>, actor: Actor = SETUP_ACTOR) {
  const data = siteInputSchema.parse(input);
  return inTransaction(db, async (tx) => {
    const site = await tx.site.create({ data });
    await auditCreate(tx, actor, site.schoolId, "site", site.id, { name: site.name, latitudeDeg: site.latitudeDeg, longitudeDeg: site.longitudeDeg, elevationM: site.elevationM, timeZone: site.timeZone });
    return site;
  });
}

/** Corrects a launch site (name, position, elevation, IANA zone); flights keep pointing at it. */
export async function updateSite(db: DbLike, siteId: string, input: z.input<typeof siteUpdateSchema>, actor: Actor = SETUP_ACTOR) {
  const data = siteUpdateSchema.parse(input);
  const site = await db.site.update({ where: { id: siteId }, data });
  await audit(db, actor, site.schoolId, "site.update", "site", site.id, data);
  return site;
}
