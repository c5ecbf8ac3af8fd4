import type { Metadata } from "next";
import Link from "next/link";
import { describeInvitation } from "@/lib/auth/accounts";
import { getDb } from "@/lib/db";
import { getViewer } from "@/app/_lib/viewer";
import { acceptInvitationAction } from "@/app/account/actions";

export const metadata: Metadata = { title: "Invitation" };

const ROLE_WORDS = { reader: "reader (sees the school's flights)", contributor: "contributor (uploads and edits flights and setup)", "school-admin": "school admin (also manages members)" } as const;

export default async function InvitationPage({ params, searchParams }: { params: Promise<{ secret: string }>; searchParams: Promise<{ error?: string }> }) {
  const [{ secret }, { error }] = await Promise.all([params, searchParams]);
  const [viewer, invitation] = await Promise.all([getViewer(), describeInvitation(getDb(), secret)]);
  if (!invitation) {
    return (
      <>
        <h1>Join a school</h1>
        <p className="notice notice-error" role="alert">This invitation link is not known. Check that it was copied whole, or ask for a new one.</p>
      </>
    );
  }
  const back = `/invite/${secret}`;
  return (
    <>
      <h1>Join {invitation.schoolName}</h1>
      <p>This link invites you to <strong>{invitation.schoolName}</strong> as <strong>{ROLE_WORDS[invitation.role]}</strong>.</p>
      {error ? <p className="notice notice-error" role="alert">{error}</p> : null}
      {invitation.state === "used" ? <p className="notice notice-error" role="alert">This invitation was already used. Ask the school&apos;s admin for a new link.</p> : null}
      {invitation.state === "expired" ? <p className="notice notice-error" role="alert">This invitation expired on {invitation.expiresAt.toISOString().slice(0, 10)}. Ask the school&apos;s admin for a new link.</p> : null}
      {invitation.state !== "open" ? null : viewer.kind === "member" ? (
        <form action={acceptInvitationAction}>
          <input type="hidden" name="secret" value={secret} />
          <p>Accept this invitation as {viewer.email}? It can be used once and is valid until {invitation.expiresAt.toISOString().slice(0, 10)}.</p>
          <button className="button" type="submit">Accept invitation</button>
        </form>
      ) : (
        <p>
          <Link href={`/account?next=${encodeURIComponent(back)}&invitation=${encodeURIComponent(secret)}`}>Sign in or create an account</Link> first: a new account made from there joins {invitation.schoolName} at once; after signing in, come back to this link.
        </p>
      )}
    </>
  );
}
