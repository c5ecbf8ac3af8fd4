import type { ReactNode } from "react";
import Link from "next/link";
import { getViewer } from "@/app/_lib/viewer";
import "./setup.css";

const SECTIONS = [
  { href: "/setup", label: "Overview" },
  { href: "/setup/sites", label: "Sites" },
  { href: "/setup/payloads", label: "Payloads" },
  { href: "/setup/sensors", label: "Sensors and calibrations" },
  { href: "/setup/layouts", label: "Logger layouts" },
  { href: "/setup/parameters", label: "Analysis parameters" },
  { href: "/setup/reprocess?all=1", label: "Re-analysis" },
];

export default async function SetupLayout({ children }: { children: ReactNode }) {
  const viewer = await getViewer();
  if (viewer.kind === "anonymous") {
    return (
      <>
        <h1>Setup</h1>
        <p className="notice notice-warn" role="status">
          Setup is for the program&apos;s members. <Link href="/account?next=/setup">Sign in</Link> first.
        </p>
      </>
    );
  }
  return (
    <>
      <nav aria-label="Setup sections" className="setup-nav">
        <ul>
          {SECTIONS.map((s) => <li key={s.href}><Link href={s.href}>{s.label}</Link></li>)}
        </ul>
      </nav>
      {children}
    </>
  );
}
