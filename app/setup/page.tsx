import type { Metadata } from "next";
import Link from "next/link";
import { connection } from "next/server";
import { listSetupSchools } from "@/lib/query/setup-pages";
import { getProgramSettings } from "@/lib/ingest/setup-reads";
import { getViewer } from "@/app/_lib/viewer";
import { can } from "@/lib/auth/permissions";
import { NewSchoolForm } from "./_components/new-school-form";
import { RemoveDemoForm } from "./_components/remove-demo-form";
import { getDemoPresence } from "@/lib/ingest/demo-data";
import { membersOnly } from "@/app/setup/_lib/members-only";

export const metadata: Metadata = { title: "Setup" };

export default async function SetupPage() {
  const gate = await membersOnly();
  if (gate) return gate;
  await connection();
  const viewer = await getViewer();
  const [schools, settings, demo] = await Promise.all([listSetupSchools(), getProgramSettings(), getDemoPresence()]);
  const isProgramAdmin = can(viewer, "program.settings", { schoolId: null });
  const p = settings.parameters;
  return (
    <>
      <h1>Setup</h1>
      <p className="lead">
        Launch sites, payloads, sensors with their calibrations, and logger layouts for every school, and the program&apos;s analysis
        parameters. Changing a calibration, a layout or the parameters lists the flights it affects and offers to re-analyse them;
        earlier runs are kept.
      </p>
      <div className="table-wrap" role="region" aria-label="Schools" tabIndex={0}>
        <table>
          <thead>
            <tr><th scope="col">School</th><th scope="col" className="num">Sites</th><th scope="col" className="num">Payloads</th><th scope="col" className="num">Sensors</th><th scope="col" className="num">Logger layouts</th><th scope="col" className="num">Flights</th></tr>
          </thead>
          <tbody>
            {schools.map((s) => (
              <tr key={s.id}>
                <td>{s.name}</td>
                <td className="num"><Link href={`/setup/sites?school=${s.id}`}>{s.counts.sites}</Link></td>
                <td className="num"><Link href={`/setup/payloads?school=${s.id}`}>{s.counts.payloads}</Link></td>
                <td className="num"><Link href={`/setup/sensors?school=${s.id}`}>{s.counts.sensors}</Link></td>
                <td className="num"><Link href={`/setup/layouts?school=${s.id}`}>{s.counts.layouts}</Link></td>
                <td className="num"><Link href={`/flights?school=${s.id}`}>{s.counts.flights}</Link></td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {schools.length === 0 && <p className="notice notice-warn">No school exists yet: add one below, or load the invented demo program with <code>npm run lapsebank -- demo</code>.</p>}
      {isProgramAdmin && <NewSchoolForm />}
      {isProgramAdmin && demo.flights > 0 && <RemoveDemoForm flights={demo.flights} />}
      <h2>Analysis parameters</h2>
      <p>
        Bin size {p.binSizeM} m, tropopause search from {p.tropopauseSearchFloorM} m, lag correction {p.lagCorrection.enabled ? `on (τ = ${p.lagCorrection.timeConstantS} s)` : "off"},
        smoothing {p.smoothingWindowS} s{settings.isDefault ? " (the built-in defaults)" : `, set ${settings.updatedAt?.slice(0, 10) ?? ""}`}. <Link href="/setup/parameters">Change</Link>
      </p>
    </>
  );
}
