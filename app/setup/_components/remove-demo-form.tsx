"use client";

import { useActionState } from "react";
import { removeDemoAction } from "../demo-actions";

/** The program admin's control that deletes the invented demo program (with a confirmation). */
export function RemoveDemoForm({ flights }: { flights: number }) {
  const [state, action, pending] = useActionState(removeDemoAction, null);
  return (
    <form
      action={action}
      className="panel"
      aria-labelledby="remove-demo-heading"
      onSubmit={(event) => {
        if (!window.confirm(`Delete the ${flights} invented demo flights and the demo setup? Real flights and anything they use stay.`)) event.preventDefault();
      }}
    >
      <h2 id="remove-demo-heading">Demo data</h2>
      <p>
        This archive holds {flights} invented demo flight{flights === 1 ? "" : "s"} (marked &ldquo;demo&rdquo; everywhere). Removing them deletes
        exactly the demo flights and the demo schools&apos; sites, payloads, sensors, calibrations and logger layouts; anything a real flight
        uses is kept and listed.
      </p>
      <label className="field"><span><input type="checkbox" name="confirm" value="remove-demo" required /> Yes, delete the demo data</span></label>
      {state ? <p role={state.ok ? "status" : "alert"} className={`notice ${state.ok ? "notice-ok" : "notice-error"}`}>{state.message}</p> : null}
      {state?.kept.length ? <ul className="small">{state.kept.map((k) => <li key={k}>Kept {k}</li>)}</ul> : null}
      <button className="button" type="submit" disabled={pending}>Remove demo data</button>
    </form>
  );
}
