import Link from "next/link";
import { getViewer } from "@/app/_lib/viewer";

/** Header corner: who is signed in, or a sign-in link. */
export async function AccountLink() {
  const viewer = await getViewer().catch(() => null);
  if (!viewer) return null;
  if (viewer.kind === "member") return <Link className="account-link" href="/account">{viewer.displayName ?? viewer.email ?? "Account"}</Link>;
  if (viewer.kind === "local") return <Link className="account-link" href="/account" title="No accounts yet: this install is single-user">Local mode</Link>;
  return <Link className="account-link" href="/account">Sign in</Link>;
}
