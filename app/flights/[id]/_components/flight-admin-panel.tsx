import { can } from "@/lib/auth/permissions";
import type { Viewer } from "@/lib/auth/visibility";
import { deleteFlightAction, editFlightAction } from "../actions";

/** Edit title, notes and visibility, or delete (restorable by an admin): shown to those who may. */
export function FlightAdminPanel({ viewer, flight }: { viewer: Viewer; flight: { id: string; title: string; notes: string; visibility: string; school: { id: string } } }) {
  if (!can(viewer, "flight.edit", { schoolId: flight.school.id })) return null;
  return (
    <details className="panel">
      <summary>Edit flight, visibility or delete</summary>
      <form action={editFlightAction}>
        <input type="hidden" name="flightId" value={flight.id} />
        <label className="field field-wide">Title<input name="title" defaultValue={flight.title} required maxLength={200} /></label>
        <label className="field field-wide">Notes<textarea name="notes" defaultValue={flight.notes} rows={3} maxLength={5000} /></label>
        <label className="field">
          Who may see it
          <select name="visibility" defaultValue={flight.visibility}>
            <option value="school">school only</option>
            <option value="program">everyone in the program</option>
            <option value="public">public</option>
          </select>
        </label>
        <button className="button" type="submit">Save</button>
      </form>
      <form action={deleteFlightAction}>
        <input type="hidden" name="flightId" value={flight.id} />
        <p className="muted">Deleting hides the flight everywhere; a program or school admin can restore it from the audit page.</p>
        <button className="button button-secondary" type="submit">Delete flight</button>
      </form>
    </details>
  );
}
