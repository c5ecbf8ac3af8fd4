"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { PermissionError } from "@/lib/auth/permissions";
import { getDb } from "@/lib/db";
import { removeDemoProgram } from "@/lib/ingest/demo-data";
import { currentActor, getViewer } from "@/app/_lib/viewer";

export type DemoRemovalState = { ok: boolean; message: string; kept: string[] } | null;

const confirmationSchema = z.object({ confirm: z.literal("remove-demo", { error: "Tick the box to confirm that the demo should be deleted." }) });

/** Deletes the invented demo program: program admins only, the same lib function as `demo remove`. */
export async function removeDemoAction(_: DemoRemovalState, formData: FormData): Promise<DemoRemovalState> {
  const parsed = confirmationSchema.safeParse({ confirm: formData.get("confirm") });
  if (!parsed.success) return { ok: false, message: z.prettifyError(parsed.error), kept: [] };
  try {
    const report = await removeDemoProgram(getDb(), await getViewer(), await currentActor("web setup"));
    revalidatePath("/", "layout");
    return {
      ok: true,
      message: `Demo removed: ${report.flights} flights, ${report.schools} schools, ${report.sites} sites, ${report.payloads} payloads, ${report.sensors} sensors, ${report.calibrations} calibrations, ${report.layouts} logger layouts.`,
      kept: report.kept.map((k) => `${k.kind} ${k.name}: ${k.reason}`),
    };
  } catch (error) {
    if (error instanceof PermissionError) return { ok: false, message: "Only program admins may remove the demo data.", kept: [] };
    throw error;
  }
}
