"use client";

import { useActionState } from "react";
import { createSchoolAction } from "../school-actions";

export function NewSchoolForm() {
  const [state, action, pending] = useActionState(createSchoolAction, null);
  return (
    <form action={action} className="panel" aria-labelledby="new-school-heading">
      <h2 id="new-school-heading">Add a school</h2>
      <label className="field">School name<input name="name" required minLength={2} maxLength={120} /></label>
      {state ? <p role={state.ok ? "status" : "alert"} className={`notice ${state.ok ? "notice-ok" : "notice-error"}`}>{state.message}</p> : null}
      <button className="button" type="submit" disabled={pending}>Add school</button>
    </form>
  );
}
