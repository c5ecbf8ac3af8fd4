import type { Metadata } from "next";
import { connection } from "next/server";
import { getProgramSettings } from "@/lib/ingest/setup-reads";
import { ParametersForm } from "@/app/_components/setup/parameters-form";
import { getViewer } from "@/app/_lib/viewer";
import { membersOnly } from "@/app/setup/_lib/members-only";
import { mayEditProgram } from "@/app/setup/_lib/permissions";
import { SignUpRuleForm } from "@/app/_components/setup/sign-up-rule-form";

export const metadata: Metadata = { title: "Analysis parameters · Setup" };

export default async function ParametersPage() {
  const gate = await membersOnly();
  if (gate) return gate;
  await connection();
  const viewer = await getViewer();
  const settings = await getProgramSettings();
  return (
    <>
      <h1>Analysis parameters</h1>
      <p className="lead">
        Set once for the whole program and recorded with every analysis run. Changing them does not alter stored runs; after saving, every
        flight is listed for re-analysis.
      </p>
      <p className="muted small">{settings.isDefault ? "The built-in defaults are in use." : `Last changed ${settings.updatedAt?.slice(0, 16).replace("T", " ")} UTC.`}</p>
      <ParametersForm initial={settings.parameters} defaults={settings.defaults} />
      <SignUpRuleForm initial={settings.invitationOnly} editable={mayEditProgram(viewer)} />
    </>
  );
}
