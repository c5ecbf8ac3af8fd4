"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { can } from "@/lib/auth/permissions";
import { getDb } from "@/lib/db";
import { createSchool, schoolInputSchema } from "@/lib/ingest";
import { currentActor, getViewer } from "@/app/_lib/viewer";

export type SchoolFormState = { ok: boolean; message: string } | null;

/** New school: program admins only (or anyone on a single-user install without accounts). */
export async function createSchoolAction(_: SchoolFormState, formData: FormData): Promise<SchoolFormState> {
  const viewer = await getViewer();
  if (!can(viewer, "program.settings", { schoolId: null })) return { ok: false, message: "Only program admins add schools." };
  const parsed = schoolInputSchema.safeParse({ name: formData.get("name") });
  if (!parsed.success) return { ok: false, message: z.prettifyError(parsed.error) };
  const db = getDb();
  try {
    const school = await createSchool(db, parsed.data, await currentActor("web setup"));
    if (viewer.kind === "member") {
      await db.membership.create({ data: { userId: viewer.userId, schoolId: school.id, role: "school-admin" } });
    }
  } catch {
    return { ok: false, message: "A school with that name already exists." };
  }
  revalidatePath("/setup");
  revalidatePath("/upload");
  return { ok: true, message: `School "${parsed.data.name}" added. Add its launch sites, payloads, sensors and logger layouts next.` };
}
