"use client";

import { useActionState, useState } from "react";
import { changePasswordAction, createInvitationAction, createTokenAction, signInAction, signUpAction, type FormState } from "../actions";

function Message({ state }: { state: FormState }) {
  if (!state) return null;
  return (
    <div role={state.ok ? "status" : "alert"} className={`notice ${state.ok ? "notice-ok" : "notice-error"}`}>
      <p>{state.message}</p>
      {state.secret ? (
        <p>
          <code data-testid="one-time-secret" style={{ userSelect: "all", wordBreak: "break-all" }}>{state.secret}</code>
        </p>
      ) : null}
    </div>
  );
}

function FieldError({ state, name }: { state: FormState; name: string }) {
  const errors = state?.fieldErrors?.[name];
  return errors?.length ? <span className="field-error">{errors.join(" ")}</span> : null;
}

export function SignInForm({ next }: { next: string }) {
  const [state, action, pending] = useActionState(signInAction, null);
  // Controlled, so the reset React gives a form after its action leaves the email in place: after a
  // wrong password a retry needs only the password (an emptied required email silently blocked it).
  const [email, setEmail] = useState("");
  return (
    <form action={action} className="panel" aria-labelledby="sign-in-heading">
      <h2 id="sign-in-heading">Sign in</h2>
      <input type="hidden" name="next" value={next} />
      <label className="field">Email<input name="email" type="email" autoComplete="username" required value={email} onChange={(event) => setEmail(event.target.value)} /></label>
      <FieldError state={state} name="email" />
      <label className="field">Password<input name="password" type="password" autoComplete="current-password" required /></label>
      <FieldError state={state} name="password" />
      <Message state={state} />
      <button className="button" type="submit" disabled={pending}>{pending ? "Signing in…" : "Sign in"}</button>
    </form>
  );
}

export function SignUpForm({ next, first, invitation = "" }: { next: string; first: boolean; invitation?: string }) {
  const [state, action, pending] = useActionState(signUpAction, null);
  return (
    <form action={action} className="panel" aria-labelledby="sign-up-heading">
      <h2 id="sign-up-heading">{first ? "Create the first account" : "Create an account"}</h2>
      {first ? <p className="muted">No account exists yet, so anyone at this computer may do everything. The first account becomes the program admin; after that, visitors see public flights only until they sign in.</p> : null}
      <input type="hidden" name="next" value={next} />
      {invitation ? <input type="hidden" name="invitation" value={invitation} /> : null}
      {invitation ? <p className="muted">The new account joins the school of your invitation link.</p> : null}
      <label className="field">Name<input name="displayName" autoComplete="name" required /></label>
      <FieldError state={state} name="displayName" />
      <label className="field">Email<input name="email" type="email" autoComplete="email" required /></label>
      <FieldError state={state} name="email" />
      <label className="field">Password (at least 10 characters)<input name="password" type="password" autoComplete="new-password" minLength={10} required /></label>
      <FieldError state={state} name="password" />
      <Message state={state} />
      <button className="button" type="submit" disabled={pending}>{pending ? "Creating…" : "Create account"}</button>
    </form>
  );
}

export function ChangePasswordForm() {
  const [state, action, pending] = useActionState(changePasswordAction, null);
  return (
    <form action={action} className="panel" aria-labelledby="password-heading">
      <h2 id="password-heading">Change password</h2>
      <label className="field">Current password<input name="currentPassword" type="password" autoComplete="current-password" required /></label>
      <label className="field">New password (at least 10 characters)<input name="newPassword" type="password" autoComplete="new-password" minLength={10} required /></label>
      <Message state={state} />
      <button className="button" type="submit" disabled={pending}>Change password</button>
    </form>
  );
}

export function CreateTokenForm({ schools }: { schools: Array<{ id: string; name: string }> }) {
  const [state, action, pending] = useActionState(createTokenAction, null);
  return (
    <form action={action} className="panel" aria-labelledby="token-heading">
      <h3 id="token-heading">New API token</h3>
      <label className="field">
        School
        <select name="schoolId" required defaultValue={schools[0]?.id ?? ""}>
          {schools.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
        </select>
      </label>
      <label className="field">Name<input name="name" placeholder="e.g. field laptop" required /></label>
      <fieldset>
        <legend>Scopes</legend>
        <label className="radio-row"><input type="checkbox" name="scopes" value="read" defaultChecked /> read</label>
        <label className="radio-row"><input type="checkbox" name="scopes" value="upload" /> upload</label>
      </fieldset>
      <FieldError state={state} name="scopes" />
      <Message state={state} />
      <button className="button" type="submit" disabled={pending || schools.length === 0}>Create token</button>
    </form>
  );
}

export function InviteForm({ schoolId }: { schoolId: string }) {
  const [state, action, pending] = useActionState(createInvitationAction, null);
  return (
    <form action={action} className="panel" aria-labelledby="invite-heading">
      <h2 id="invite-heading">Invite someone</h2>
      <p className="muted">Lapsebank sends no mail: copy the link and pass it on. It works once and expires after 7 days.</p>
      <input type="hidden" name="schoolId" value={schoolId} />
      <label className="field">
        Role
        <select name="role" defaultValue="contributor">
          <option value="reader">reader (sees the school&apos;s flights)</option>
          <option value="contributor">contributor (uploads and edits flights and setup)</option>
          <option value="school-admin">school admin (also manages members)</option>
        </select>
      </label>
      <Message state={state} />
      <button className="button" type="submit" disabled={pending}>Make invitation link</button>
    </form>
  );
}
