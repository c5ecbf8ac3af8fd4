import type { Metadata } from "next";
import Link from "next/link";
import { getAccount, hasAnyAccount, listSchools, signUpNeedsInvitation } from "@/lib/query/accounts";
import { getViewer } from "@/app/_lib/viewer";
import { can } from "@/lib/auth/permissions";
import { signOutAction, revokeTokenAction } from "./actions";
import { ChangePasswordForm, CreateTokenForm, SignInForm, SignUpForm } from "./_components/account-forms";

export const metadata: Metadata = { title: "Account" };

export default async function AccountPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const params = await searchParams;
  const next = typeof params.next === "string" ? params.next : "";
  const invitation = typeof params.invitation === "string" ? params.invitation.slice(0, 200) : "";
  const viewer = await getViewer();
  const error = params.error === "token-not-found" ? "No such token among yours: nothing was revoked." : "";
  if (viewer.kind === "member" && !can(viewer, "account.manage", { schoolId: null })) {
    return (
      <>
        <h1>Account</h1>
        <p className="notice notice-error" role="alert">API tokens cannot open the account page; sign in instead.</p>
      </>
    );
  }
  if (viewer.kind !== "member") {
    const [anyAccount, needsInvitation] = await Promise.all([hasAnyAccount(), signUpNeedsInvitation()]);
    // Invitation-only: without a link the sign-up form could only be refused, so say so instead.
    const signUpOpen = !anyAccount || !needsInvitation || invitation !== "";
    return (
      <>
        <h1>Account</h1>
        {anyAccount ? <p className="lead">Sign in to see your school&apos;s flights and the program&apos;s shared flights, and to upload. Without an account you see public flights only.</p> : null}
        <div className="cards">
          {anyAccount ? <SignInForm next={next} /> : null}
          {signUpOpen ? <SignUpForm next={next} first={!anyAccount} invitation={invitation} /> : (
            <section className="panel" aria-labelledby="sign-up-closed-heading">
              <h2 id="sign-up-closed-heading">Create an account</h2>
              <p>This program accepts new accounts by invitation only. Ask a school admin for an invitation link and open it to sign up.</p>
            </section>
          )}
        </div>
      </>
    );
  }
  const [account, schools] = await Promise.all([getAccount(viewer.userId), listSchools()]);
  if (!account) return <p>Your account no longer exists.</p>;
  const tokenSchools = account.isProgramAdmin ? schools : account.memberships.map((m) => m.school);
  return (
    <>
      <h1>{account.displayName}</h1>
      <p className="lead">
        {account.email}
        {account.isProgramAdmin ? " · program admin" : ""}
      </p>
      {params.joined ? <p className="notice notice-ok" role="status">You joined the school.</p> : null}
      {error ? <p className="notice notice-error" role="alert">{error}</p> : null}
      <form action={signOutAction}>
        <button className="button button-secondary" type="submit">Sign out</button>
      </form>
      <h2>Schools</h2>
      {account.memberships.length === 0 ? (
        <p className="muted">You belong to no school yet. Ask a school admin for an invitation link.</p>
      ) : (
        <ul>
          {account.memberships.map((m) => (
            <li key={m.school.id}>
              {m.school.name} — {m.role}
              {m.role === "school-admin" || account.isProgramAdmin ? <> · <Link href={`/schools/${m.school.id}/members`}>members</Link></> : null}
            </li>
          ))}
        </ul>
      )}
      {account.isProgramAdmin ? (
        <p>
          Program admin: <Link href="/audit">audit log and deleted flights</Link> · manage members of{" "}
          {schools.map((s, i) => (
            <span key={s.id}>{i ? ", " : ""}<Link href={`/schools/${s.id}/members`}>{s.name}</Link></span>
          ))}
        </p>
      ) : null}
      <h2>API tokens</h2>
      <p className="muted">
        Scripts and the CLI (<code>npm run lapsebank -- ingest --server URL --token …</code>) authenticate with a token sent as{" "}
        <code>Authorization: Bearer …</code>. Tokens are stored hashed and shown once.
      </p>
      {account.apiTokens.length ? (
        <div className="table-wrap">
          <table>
            <thead>
              <tr><th scope="col">Name</th><th scope="col">School</th><th scope="col">Scopes</th><th scope="col">Created</th><th scope="col">Last used</th><th scope="col">State</th></tr>
            </thead>
            <tbody>
              {account.apiTokens.map((t) => (
                <tr key={t.id}>
                  <td>{t.name}</td>
                  <td>{t.school.name}</td>
                  <td>{t.scopes.replace(",", ", ")}</td>
                  <td>{t.createdAt.toISOString().slice(0, 16).replace("T", " ")} UTC</td>
                  <td>{t.lastUsedAt ? `${t.lastUsedAt.toISOString().slice(0, 16).replace("T", " ")} UTC` : "never"}</td>
                  <td>
                    {t.revokedAt ? "revoked" : (
                      <form action={revokeTokenAction}>
                        <input type="hidden" name="tokenId" value={t.id} />
                        <button className="button button-secondary" type="submit">Revoke {t.name}</button>
                      </form>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
      <CreateTokenForm schools={tokenSchools} />
      <ChangePasswordForm />
    </>
  );
}
