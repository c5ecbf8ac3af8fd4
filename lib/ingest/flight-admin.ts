import { z } from "zod";
import type { Db } from "../db/index.ts";
import { requirePermission } from "../auth/permissions.ts";
import type { Viewer } from "../auth/visibility.ts";
import { visibilitySchema } from "./schemas.ts";

export const flightEditSchema = z.object({
  title: z.string().trim().min(1, "Give the flight a title").max(200).optional(),
  notes: z.string().max(5000).optional(),
  visibility: visibilitySchema.optional(),
});

function actorOf(viewer: Viewer): { actorUserId: string | null; actorLabel: string } {
  return viewer.kind === "member" ? { actorUserId: viewer.userId, actorLabel: viewer.email ?? viewer.userId } : { actorUserId: null, actorLabel: viewer.kind };
}

async function loadFlight(db: Db, flightId: string) {
  const flight = await db.flight.findUnique({ where: { id: flightId }, select: { id: true, schoolId: true, visibility: true, deletedAt: true, title: true, notes: true } });
  if (!flight) throw new FlightNotFoundError(flightId);
  return flight;
}

export class FlightNotFoundError extends Error {
  constructor(flightId: string) {
    super(`Flight ${flightId} does not exist`);
    this.name = "FlightNotFoundError";
  }
}

/** Title, notes and visibility changes, checked against the viewer's role and audited. */
export async function editFlight(db: Db, viewer: Viewer, flightId: string, input: z.input<typeof flightEditSchema>) {
  const changes = flightEditSchema.parse(input);
  const flight = await loadFlight(db, flightId);
  requirePermission(viewer, "flight.read", { schoolId: flight.schoolId, visibility: flight.visibility, deleted: flight.deletedAt !== null });
  requirePermission(viewer, "flight.edit", { schoolId: flight.schoolId });
  const before = { title: flight.title, notes: flight.notes, visibility: flight.visibility };
  await db.$transaction([
    db.flight.update({ where: { id: flightId }, data: changes }),
    db.auditEvent.create({
      data: {
        ...actorOf(viewer), schoolId: flight.schoolId, entityType: "flight", entityId: flightId,
        action: changes.visibility && changes.visibility !== flight.visibility ? "flight.visibility" : "flight.edit",
        details: { before, after: changes },
      },
    }),
  ]);
}

/** Soft delete: the flight disappears from every list and query, but an admin can restore it. */
export async function deleteFlight(db: Db, viewer: Viewer, flightId: string) {
  const flight = await loadFlight(db, flightId);
  requirePermission(viewer, "flight.read", { schoolId: flight.schoolId, visibility: flight.visibility, deleted: flight.deletedAt !== null });
  requirePermission(viewer, "flight.delete", { schoolId: flight.schoolId });
  await db.$transaction([
    db.flight.update({ where: { id: flightId }, data: { deletedAt: new Date() } }),
    db.auditEvent.create({ data: { ...actorOf(viewer), schoolId: flight.schoolId, action: "flight.delete", entityType: "flight", entityId: flightId } }),
  ]);
}

export async function restoreFlight(db: Db, viewer: Viewer, flightId: string) {
  const flight = await loadFlight(db, flightId);
  requirePermission(viewer, "flight.restore", { schoolId: flight.schoolId });
  await db.$transaction([
    db.flight.update({ where: { id: flightId }, data: { deletedAt: null } }),
    db.auditEvent.create({ data: { ...actorOf(viewer), schoolId: flight.schoolId, action: "flight.restore", entityType: "flight", entityId: flightId } }),
  ]);
}
