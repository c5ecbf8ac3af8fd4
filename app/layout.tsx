import type { Metadata } from "next";
import type { ReactNode } from "react";
import Link from "next/link";
import "./globals.css";
import { AccountLink } from "./_components/account-link";

export const metadata: Metadata = {
  title: { default: "Lapsebank", template: "%s · Lapsebank" },
  description: "Shared archive and climatology of temperature soundings from high-altitude balloon flights.",
};

const NAV = [
  { href: "/flights", label: "Archive" },
  { href: "/upload", label: "Upload" },
  { href: "/climatology", label: "Climatology" },
  { href: "/setup", label: "Setup" },
];

export default function RootLayout({ children }: { children: ReactNode }) {
  return (
    <html lang="en">
      <body>
        <a className="skip-link" href="#main">Skip to content</a>
        <header className="site-header">
          <div className="site-header-inner">
            <Link href="/" className="brand">
              <svg aria-hidden="true" width="28" height="28" viewBox="0 0 28 28" className="brand-mark">
                <path d="M4 24 L12 14 L10 10 L20 4" fill="none" stroke="currentColor" strokeWidth="2.5" strokeLinecap="round" strokeLinejoin="round" />
                <circle cx="20" cy="4" r="2.5" fill="currentColor" />
              </svg>
              Lapsebank
            </Link>
            <nav aria-label="Main">
              <ul>
                {NAV.map((item) => (
                  <li key={item.href}>
                    <Link href={item.href}>{item.label}</Link>
                  </li>
                ))}
              </ul>
            </nav>
            <AccountLink />
          </div>
        </header>
        <main id="main" tabIndex={-1}>
          {children}
        </main>
        <footer className="site-footer">
          <p>Lapsebank: one archive for every school&apos;s sounding flights, analysed the same way, with raw files and provenance kept.</p>
        </footer>
      </body>
    </html>
  );
}
