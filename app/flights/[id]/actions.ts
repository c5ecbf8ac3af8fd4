"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { PermissionError } from "@/lib/auth/permissions";
import { getDb } from "@/lib/db";
import { deleteFlight, editFlight, FlightNotFoundError, restoreFlight } from "@/lib/ingest/flight-admin";
import { getViewer } from "@/app/_lib/viewer";

function refusedTo(flightId: string, error: unknown): never {
  if (error instanceof PermissionError || error instanceof FlightNotFoundError) {
    redirect(`/flights/${flightId}?error=${encodeURIComponent(error.message)}`);
  }
  throw error;
}

/** Title, notes and visibility from the flight page's edit form. */
export async function editFlightAction(formData: FormData): Promise<void> {
  const flightId = String(formData.get("flightId") ?? "");
  try {
    await editFlight(getDb(), await getViewer(), flightId, {
      title: String(formData.get("title") ?? ""),
      notes: String(formData.get("notes") ?? ""),
      visibility: String(formData.get("visibility") ?? "program") as "school" | "program" | "public",
    });
  } catch (error) {
    refusedTo(flightId, error);
  }
  revalidatePath(`/flights/${flightId}`);
  redirect(`/flights/${flightId}?saved=1`);
}

export async function deleteFlightAction(formData: FormData): Promise<void> {
  const flightId = String(formData.get("flightId") ?? "");
  try {
    await deleteFlight(getDb(), await getViewer(), flightId);
  } catch (error) {
    refusedTo(flightId, error);
  }
  revalidatePath("/flights");
  redirect(`/flights?deleted=${encodeURIComponent(flightId)}`);
}

export async function restoreFlightAction(formData: FormData): Promise<void> {
  const flightId = String(formData.get("flightId") ?? "");
  try {
    await restoreFlight(getDb(), await getViewer(), flightId);
  } catch (error) {
    refusedTo(flightId, error);
  }
  revalidatePath("/flights");
  revalidatePath("/audit");
  redirect(`/flights/${flightId}`);
}
