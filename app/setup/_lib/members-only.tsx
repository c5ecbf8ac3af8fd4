import type { ReactNode } from "react";
import Link from "next/link";
import { readingViewer } from "@/lib/auth/visibility";
import { getViewer } from "@/app/_lib/viewer";

/**
 * Setup is for the program's members. Every setup page calls this itself (a layout check alone
 * is not enough: a page segment can be requested on its own). Null means "go on".
 */
export async function membersOnly(): Promise<ReactNode | null> {
  const viewer = await getViewer();
  if (viewer.kind === "local" || readingViewer(viewer).kind === "member") return null;
  return (
    <>
      <h1>Setup</h1>
      <p className="notice notice-warn" role="status">
        Setup is for the program&apos;s members.{" "}
        {viewer.kind === "anonymous" ? <Link href="/account?next=/setup">Sign in</Link> : "Ask a school admin for an invitation."}
      </p>
    </>
  );
}
