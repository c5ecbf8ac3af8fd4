import Link from "next/link";
import { connection } from "next/server";
import { countFlights } from "@/lib/query/flights";
import { listSchoolsAndSites } from "@/lib/query/setup";
import { Cautions } from "@/app/_components/cautions";
import { getViewer } from "@/app/_lib/viewer";

export default async function HomePage() {
  await connection();
  const viewer = await getViewer();
  const [flightCount, { schools, sites }] = await Promise.all([countFlights(viewer), listSchoolsAndSites()]);
  return (
    <>
      <h1>Lapsebank</h1>
      <p className="lead">
        A shared archive of temperature soundings from high-altitude balloon flights. Every school&apos;s raw logger files
        are calibrated and analysed the same way: binned profiles, inversions, tropospheric lapse rate and tropopause,
        with the raw bytes and the analysis provenance kept for each flight.
      </p>
      <div className="cards">
        <div className="card">
          <div className="stat-number">{flightCount}</div>
          <div>flights in the archive</div>
          <Link href="/flights">Browse the archive</Link>
        </div>
        <div className="card">
          <div className="stat-number">{schools.length}</div>
          <div>schools</div>
        </div>
        <div className="card">
          <div className="stat-number">{sites.length}</div>
          <div>launch sites</div>
        </div>
        <div className="card">
          <h2>Add a flight</h2>
          <p>Upload a logger file right after recovery and see its profile, layers and stability at once.</p>
          <Link className="button" href="/upload">Upload a flight</Link>
        </div>
      </div>
      <h2>What you can do here</h2>
      <ul>
        <li><Link href="/flights">Archive</Link>: filter flights by school, site, date and season; sort by a click on a column (launch time, title, tropopause, lapse rate).</li>
        <li><Link href="/upload">Upload</Link>: one or many logger files, with a preview of the parsed rows before anything is stored.</li>
        <li>Each flight page shows the temperature–altitude profile, layers with lapse rate ± standard error and stability class, quality-control notes and the raw file.</li>
        <li><Link href="/climatology">Climatology and claim checks</Link>: lapse rates, tropopause and inversions across flights, grouped by season, month, site or time of day; test a claim such as &ldquo;the mean lapse rate is 6.5 K/km&rdquo; or &ldquo;summer differs from autumn&rdquo;.</li>
        <li>Export: the Archive, a Climatology result or one flight as a data package (every table, datapackage.json, citation, README), one CSV table or JSON, from the Export panel on those pages.</li>
        <li>Scripts can use the JSON API under <code>/api/v1/flights</code>, <code>/api/v1/climatology</code> and <code>/api/v1/export</code>.</li>
      </ul>
      <Cautions />
    </>
  );
}
