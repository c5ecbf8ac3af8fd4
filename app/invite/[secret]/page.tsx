import type { Metadata } from "next";
import Link from "next/link";
import { getViewer } from "@/app/_lib/viewer";
import { acceptInvitationAction } from "@/app/account/actions";

export const metadata: Metadata = { title: "Invitation" };

export default async function InvitationPage({ params, searchParams }: { params: Promise<{ secret: string }>; searchParams: Promise<{ error?: string }> }) {
  const [{ secret }, { error }] = await Promise.all([params, searchParams]);
  const viewer = await getViewer();
  return (
    <>
      <h1>Join a school</h1>
      {error ? <p className="notice notice-error" role="alert">{error}</p> : null}
      {viewer.kind === "member" ? (
        <form action={acceptInvitationAction}>
          <input type="hidden" name="secret" value={secret} />
          <p>Accept this invitation as {viewer.email}?</p>
          <button className="button" type="submit">Accept invitation</button>
        </form>
      ) : (
        <p>
          <Link href={`/account?next=${encodeURIComponent(`/invite/${secret}`)}`}>Sign in or create an account</Link> first, then come back to this link.
        </p>
      )}
    </>
  );
}
