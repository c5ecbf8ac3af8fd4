import type { ReactNode } from "react";
import Link from "next/link";
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

export default function SetupLayout({ children }: { children: ReactNode }) {
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
