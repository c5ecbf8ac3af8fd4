import type { Metadata } from "next";
import Link from "next/link";

export const metadata: Metadata = { title: "Climatology" };

export default function ClimatologyPage() {
  return (
    <>
      <h1>Climatology</h1>
      <p className="notice">Coming soon: lapse rate, tropopause and inversion statistics by season, site and time of day, with claim checks and exports.</p>
      <p>Until then, the <Link href="/flights">Archive</Link> filters and sorts flights by season and site.</p>
    </>
  );
}
