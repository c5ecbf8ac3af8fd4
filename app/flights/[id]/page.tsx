import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { cache } from "react";
import { getFlight, getFlightLevels } from "@/lib/query/flights";
import { getRunHistory } from "@/lib/query/setup-pages";
import { RunHistoryPanel } from "@/app/_components/setup/run-history";
import { Cautions } from "@/app/_components/cautions";
import { ProfileChart } from "@/app/_components/profile-chart";
import { ExportPanel } from "@/app/_components/export/export-panel";
import { getViewer } from "@/app/_lib/viewer";
import { FlightAdminPanel } from "./_components/flight-admin-panel";
import { buildProfileChartData } from "@/app/_lib/profile-series";
import {
  describeCalibration, describeLayer, describeStability, describeTropopauseStatus, formatBytes, formatCelsius, formatKelvin,
  formatKm, formatLapseRate, formatLocalDateTime, formatMetres, formatNumber, formatSeason, formatStdErr, formatUtc,
} from "@/app/_lib/format";

type Params = Promise<{ id: string }>;

const loadFlight = cache(async (id: string) => getFlight(await getViewer(), id));

export async function generateMetadata({ params }: { params: Params }): Promise<Metadata> {
  const flight = await loadFlight((await params).id);
  return { title: flight ? flight.title : "Flight not found" };
}

const REMOVED_WORDS: Record<string, string> = {
  preLaunch: "before launch",
  postLanding: "after landing",
  duplicateTimes: "duplicate times",
  gpsJumps: "GPS jumps",
  temperatureSpikes: "temperature spikes",
  missingValues: "missing values",
  outOfRange: "out of plausible range",
};

export default async function FlightPage({ params }: { params: Params }) {
  const { id } = await params;
  const viewer = await getViewer();
  const [flight, levels, history] = await Promise.all([loadFlight(id), getFlightLevels(viewer, id), getRunHistory(viewer, id)]);
  if (!flight) notFound();
  const run = flight.currentRun;
  const summary = run?.summary ?? null;
  const layers = run?.layers ?? [];
  const chartData = buildProfileChartData(levels?.levels ?? [], layers, summary);
  const tz = flight.site.timeZone;
  const removed = Object.entries(run?.removedCounts ?? {}).filter(([, n]) => typeof n === "number");

  return (
    <>
      <p className="small"><Link href="/flights">← Archive</Link></p>
      <h1>{flight.title}</h1>
      <dl className="facts">
        <div><dt>School</dt><dd>{flight.school.name}</dd></div>
        <div>
          <dt>Site</dt>
          <dd>{flight.site.name} <span className="muted small">({flight.site.latitudeDeg.toFixed(3)}°, {flight.site.longitudeDeg.toFixed(3)}°, {formatMetres(flight.site.elevationM)})</span></dd>
        </div>
        <div><dt>Launch (UTC)</dt><dd>{formatUtc(flight.launchAtUtc)}</dd></div>
        <div><dt>Launch (local, {tz})</dt><dd>{formatLocalDateTime(flight.launchAtUtc, tz)}</dd></div>
        <div><dt>Season</dt><dd>{formatSeason(summary?.season, summary?.seasonName)}</dd></div>
        <div>
          <dt>Sun at launch</dt>
          <dd>
            {summary ? `${formatNumber(summary.solarElevationDeg, 1)}° elevation` : "—"}
            {summary?.hoursAfterSunrise !== null && summary?.hoursAfterSunrise !== undefined ? `, ${formatNumber(summary.hoursAfterSunrise, 1)} h after sunrise` : ""}
          </dd>
        </div>
        {flight.payload && <div><dt>Payload</dt><dd>{flight.payload.name}</dd></div>}
        {flight.sensor && <div><dt>Sensor</dt><dd>{flight.sensor.serial} ({flight.sensor.kind})</dd></div>}
        <div><dt>Visibility</dt><dd>{flight.visibility}{flight.synthetic ? " · demo data" : ""}</dd></div>
      </dl>
      {flight.notes && <p className="muted">{flight.notes}</p>}
      <FlightAdminPanel viewer={viewer} flight={flight} />

      <Cautions />

      {!run || !summary ? (
        <p className="notice notice-warn">This flight has no analysis run yet.</p>
      ) : (
        <>
          <h2>Summary</h2>
          <dl className="facts">
            <div><dt>Surface temperature</dt><dd>{formatCelsius(summary.surfaceTemperatureK)} <span className="muted small">({formatKelvin(summary.surfaceTemperatureK, 2)})</span></dd></div>
            <div><dt>Tropospheric lapse rate ± SE</dt><dd>{formatLapseRate(summary.troposphericLapseRateKPerKm, summary.troposphericLapseRateStdErrKPerKm)}</dd></div>
            <div><dt>First tropopause (MSL)</dt><dd>{formatKm(summary.tropopauseAltitudeM)}{summary.tropopauseTemperatureK !== null ? `, ${formatCelsius(summary.tropopauseTemperatureK)}` : ""}{summary.tropopausePressureHpa !== null ? `, ${formatNumber(summary.tropopausePressureHpa, 0)} hPa` : ""}</dd></div>
            <div><dt>Tropopause status</dt><dd>{describeTropopauseStatus(summary.tropopauseStatus)}</dd></div>
            <div><dt>Second tropopause (MSL)</dt><dd>{formatKm(summary.secondTropopauseAltitudeM)}</dd></div>
            <div>
              <dt>Surface inversion</dt>
              <dd>{summary.hasSurfaceInversion ? `${formatMetres(summary.surfaceInversionDepthM)} deep, +${formatNumber(summary.surfaceInversionStrengthK, 1)} K` : "none"}</dd>
            </div>
            <div><dt>Stratospheric lapse rate</dt><dd>{formatLapseRate(summary.stratosphericLapseRateKPerKm)}</dd></div>
            <div><dt>Ground (site elevation, MSL)</dt><dd>{formatMetres(summary.groundElevationM)} <span className="muted small">heights above ground level (AGL) start here</span></dd></div>
            <div><dt>Launch altitude (MSL)</dt><dd>{formatMetres(summary.launchAltitudeM)}</dd></div>
            <div><dt>Burst altitude (MSL)</dt><dd>{formatKm(summary.burstAltitudeM)}</dd></div>
            <div><dt>Maximum altitude (MSL)</dt><dd>{formatKm(summary.maxAltitudeM)}</dd></div>
            <div><dt>Descent recorded</dt><dd>{summary.hasDescent ? "yes" : "no"}</dd></div>
          </dl>

          <h2>Temperature profile</h2>
          {chartData.ascent.length === 0 ? (
            <p className="notice">No binned levels are stored for this run.</p>
          ) : (
            <ProfileChart data={chartData} title={flight.title} />
          )}

          <h2>Layers</h2>
          {layers.length === 0 ? (
            <p>No layers were found.</p>
          ) : (
            <div className="table-wrap" role="region" aria-label="Layers" tabIndex={0}>
              <table>
                <caption>Heights are metres above mean sea level (MSL); a fixed band names the reference it was asked in (AGL: above the site&apos;s ground). Fitted is the lowest to highest level the fit used. Lapse rate is −dT/dz (positive when temperature falls with height). Stability compares it with the dry (Γd) and saturated (Γm) adiabatic rates at the layer&apos;s mean temperature and pressure.</caption>
                <thead>
                  <tr>
                    <th scope="col">Layer</th>
                    <th scope="col">Phase</th>
                    <th scope="col" className="num">Base–top (m MSL)</th>
                    <th scope="col" className="num">Fitted (m MSL)</th>
                    <th scope="col" className="num">Lapse rate ± SE (K/km)</th>
                    <th scope="col" className="num">r²</th>
                    <th scope="col" className="num">Theil–Sen (K/km)</th>
                    <th scope="col" className="num">Strength (K)</th>
                    <th scope="col" className="num">Levels</th>
                    <th scope="col" className="num">Γd / Γm (K/km)</th>
                    <th scope="col">Stability</th>
                  </tr>
                </thead>
                <tbody>
                  {layers.map((layer) => (
                    <tr key={`${layer.phase}-${layer.kind}-${layer.bandReference ?? ""}-${layer.baseM}-${layer.topM}`}>
                      <td>{describeLayer(layer)}</td>
                      <td>{layer.phase}</td>
                      <td className="num">{formatNumber(layer.baseM, 0)}–{formatNumber(layer.topM, 0)}</td>
                      <td className="num">{layer.fittedBaseM !== null && layer.fittedTopM !== null ? `${formatNumber(layer.fittedBaseM, 0)}–${formatNumber(layer.fittedTopM, 0)}` : "—"}</td>
                      <td className="num">{formatNumber(layer.lapseRateKPerKm, 2)}{layer.lapseRateStdErrKPerKm !== null ? ` ± ${formatStdErr(layer.lapseRateStdErrKPerKm)}` : ""}</td>
                      <td className="num">{formatNumber(layer.rSquared, 3)}</td>
                      <td className="num">{formatNumber(layer.theilSenLapseRateKPerKm, 2)}</td>
                      <td className="num">{formatNumber(layer.strengthK, 1)}</td>
                      <td className="num">{layer.levelCount}</td>
                      <td className="num">{formatNumber(layer.dryAdiabaticLapseRateKPerKm, 2)} / {formatNumber(layer.moistAdiabaticLapseRateKPerKm, 2)}{layer.pressureFromStandardAtmosphere ? "*" : ""}</td>
                      <td className="nowrap">{describeStability(layer.stability)}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}
          {layers.some((l) => l.pressureFromStandardAtmosphere) && (
            <p className="small muted">* No pressure was measured; Γm uses the standard-atmosphere pressure at the layer&apos;s mean altitude.</p>
          )}

          <h2>Quality control</h2>
          <p>
            {run.rowCount} data rows read{run.skippedRowCount > 0 ? `, ${run.skippedRowCount} bad rows skipped (lenient mode)` : ""}.
            {" "}Flags: {run.qcFlags.length ? run.qcFlags.map((f) => <span key={f} className="flag flag-warn">{f}</span>) : <span className="flag flag-ok">none</span>}
          </p>
          {run.warnings.length > 0 ? (
            <ul>{run.warnings.map((w, i) => <li key={`${w.code}-${i}`}>{w.message}</li>)}</ul>
          ) : (
            <p className="muted">No warnings.</p>
          )}
          {removed.length > 0 && (
            <div className="table-wrap" role="region" aria-label="Removed samples" tabIndex={0}>
              <table>
                <caption>Samples removed before binning</caption>
                <thead><tr><th scope="col">Reason</th><th scope="col" className="num">Samples</th></tr></thead>
                <tbody>
                  {removed.map(([key, n]) => (
                    <tr key={key}><td>{REMOVED_WORDS[key] ?? key}</td><td className="num">{n}</td></tr>
                  ))}
                </tbody>
              </table>
            </div>
          )}

          <h2>Analysis run</h2>
          <dl className="facts">
            <div><dt>Analysis version</dt><dd>{run.analysisVersion}</dd></div>
            <div><dt>Run created</dt><dd>{formatUtc(run.createdAt)}</dd></div>
            <div><dt>Reason</dt><dd>{run.reason}</dd></div>
            <div><dt>Logger layout</dt><dd>{flight.layout.name}</dd></div>
          </dl>
          <p><strong>Calibration:</strong> {describeCalibration(run.calibrationSpec)}{run.calibrationId ? <span className="muted small"> (calibration {run.calibrationId})</span> : <span className="muted small"> (implied by the layout)</span>}</p>
          <details>
            <summary>Analysis parameters</summary>
            <pre className="json">{JSON.stringify(run.parameters, null, 2)}</pre>
          </details>
        </>
      )}

      {history && history.runs.length > 0 && <RunHistoryPanel history={history} />}

      <h2>Raw file</h2>
      <p>
        <a className="button button-secondary" href={`/api/v1/flights/${flight.id}/raw`} download={flight.rawFile.name}>Download {flight.rawFile.name}</a>{" "}
        <span className="muted small">{formatBytes(flight.rawFile.sizeBytes)}, uploaded {formatUtc(flight.rawFile.uploadedAt)}, SHA-256 <code>{flight.rawFile.sha256.slice(0, 16)}…</code></span>
      </p>
      <p className="small muted">
        JSON: <a href={`/api/v1/flights/${flight.id}`}>flight</a> · <a href={`/api/v1/flights/${flight.id}/levels`}>levels</a>
      </p>
      <ExportPanel source="flight" flightId={flight.id} flightCount={1} />
    </>
  );
}
