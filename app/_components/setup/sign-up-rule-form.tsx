"use client";

import { useState, type FormEvent } from "react";
import { useRouter } from "next/navigation";
import { saveInvitationOnly } from "@/app/setup/actions";
import { FormMessage } from "./form-bits";

/** The program's sign-up rule: anyone, or only people holding a valid invitation link. */
export function SignUpRuleForm({ initial, editable }: { initial: boolean; editable: boolean }) {
  const router = useRouter();
  const [invitationOnly, setInvitationOnly] = useState(initial);
  const [error, setError] = useState<string | null>(null);
  const [ok, setOk] = useState<string | null>(null);
  const [pending, setPending] = useState(false);
  async function submit(event: FormEvent) {
    event.preventDefault();
    setPending(true);
    setError(null);
    setOk(null);
    const result = await saveInvitationOnly({ invitationOnly });
    setPending(false);
    if (!result.ok) return setError(result.message);
    setOk(result.data.invitationOnly ? "Saved: new accounts need an invitation link." : "Saved: anyone may create an account.");
    router.refresh();
  }
  return (
    <form onSubmit={submit} className="panel" aria-labelledby="sign-up-rule-heading">
      <h2 id="sign-up-rule-heading">Who may create an account</h2>
      <label className="field">
        <span>
          <input type="checkbox" name="invitationOnly" checked={invitationOnly} disabled={!editable} onChange={(event) => setInvitationOnly(event.target.checked)} /> Accounts by invitation only
        </span>
      </label>
      <p className="muted small">When ticked, the sign-up form works only through an invitation link a school admin made. The very first account can always be created.</p>
      <FormMessage error={error} ok={ok} />
      {editable ? <button className="button" type="submit" disabled={pending}>{pending ? "Saving…" : "Save"}</button> : <p className="muted small">Only a program admin may change this.</p>}
    </form>
  );
}
