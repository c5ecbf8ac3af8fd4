import type { Metadata } from "next";
import { connection } from "next/server";
import { getUploadChoices } from "@/lib/query/setup";
import { getEnv } from "@/lib/env";
import { getViewer } from "@/app/_lib/viewer";
import { UploadForm } from "./_components/upload-form";
import Link from "next/link";
import { readingViewer } from "@/lib/auth/visibility";

export const metadata: Metadata = { title: "Upload" };

export default async function UploadPage() {
  await connection();
  const viewer = await getViewer();
  if (viewer.kind !== "local" && readingViewer(viewer).kind !== "member") {
    return (
      <>
        <h1>Upload flights</h1>
        <p className="notice notice-warn" role="status">
          Uploading is for the program&apos;s members. <Link href="/account?next=/upload">Sign in</Link>, or ask a school admin for an invitation.
        </p>
      </>
    );
  }
  const choices = await getUploadChoices();
  return (
    <>
      <h1>Upload flights</h1>
      <p className="lead">
        Choose the school, launch site and logger layout, then one or more logger files. The first rows of a chosen file are
        previewed with the layout before anything is stored. Each file is calibrated, analysed and stored with its raw bytes.
      </p>
      {choices.schools.length === 0 ? (
        <p className="notice notice-warn">
          No school exists yet. Add one on the <a href="/setup">Setup</a> page (program admins), or load the invented demo program
          with <code>npm run lapsebank -- demo --yes</code>.
        </p>
      ) : (
        <UploadForm choices={choices} maxUploadMb={getEnv().LAPSEBANK_MAX_UPLOAD_MB} />
      )}
    </>
  );
}
