import type { Metadata } from "next";
import Link from "next/link";

export const metadata: Metadata = { title: "Setup" };

export default function SetupPage() {
  return (
    <>
      <h1>Setup</h1>
      <p className="notice">Coming soon: full management of schools, sites, payloads, sensors, calibrations and logger layouts.</p>
      <p>Until then, create a site, payload, sensor with calibration, or logger layout inline on the <Link href="/upload">Upload</Link> page.</p>
    </>
  );
}
