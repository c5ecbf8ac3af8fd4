import Link from "next/link";
import type { ClaimCheckResult } from "@/lib/stats/claims";
import type { ClimatologyGroup, ClimatologyResult, GroupStatistics } from "@/lib/query/climatology-core";
import { formatLocalHour, formatNumber, formatUtc } from "@/app/_lib/format";

/** Digits shown for a metric's unit. */
export function digitsForUnit(unit: string): number {
  if (unit === "m" || unit === "%") return 0;
  if (unit === "K") return 1;
  return 2;
}

function StatCells({ stats, digits }: { stats: GroupStatistics; digits: number }) {
  const f = (v: number | null) => formatNumber(v, digits);
  return (
    <>
      <td className="num">{stats.n}</td>
      <td className="num">{f(stats.mean)}</td>
      <td className="num">{f(stats.sd)}</td>
      <td className="num">{f(stats.sem)}</td>
      <td className="num">{f(stats.median)}</td>
      <td className="num">{stats.q1 === null || stats.q3 === null ? "—" : `${f(stats.q1)} – ${f(stats.q3)}`}</td>
      <td className="num">{f(stats.min)}</td>
      <td className="num">{f(stats.max)}</td>
      <td className="num">{stats.ci95Low === null || stats.ci95High === null ? "—" : `${f(stats.ci95Low)} – ${f(stats.ci95High)}`}</td>
    </>
  );
}

/** n, mean, SD, SEM, median, IQR, min, max and 95 % CI per group, plus all groups together. */
/** groupBy × crossBy: each cell gives n, mean and the 95 % CI of the mean; empty cells show a dash. */
export function CrossTableView({ result }: { result: ClimatologyResult }) {
  const table = result.crossTable;
  if (!table) return null;
  const unit = result.metric.unit;
  const digits = digitsForUnit(unit);
  const cellOf = new Map(table.cells.map((c) => [`${c.rowKey}\u0000${c.columnKey}`, c]));
  return (
    <div className="table-wrap" role="region" aria-label="Cross-table" tabIndex={0}>
      <table>
        <caption>{result.metric.label.charAt(0).toUpperCase() + result.metric.label.slice(1)} per group and {table.by}: flights (n), mean and t-based 95 % CI of the mean, in {unit}.</caption>
        <thead>
          <tr>
            <th scope="col">Group</th>
            {table.columns.map((c) => <th key={c.key} scope="col" className="num">{c.label}</th>)}
          </tr>
        </thead>
        <tbody>
          {table.rows.map((r) => (
            <tr key={r.key}>
              <th scope="row">{r.label}</th>
              {table.columns.map((c) => {
                const cell = cellOf.get(`${r.key}\u0000${c.key}`);
                return (
                  <td key={c.key} className="num">
                    {cell ? <>n = {cell.n}, {formatNumber(cell.mean, digits)}<br /><span className="muted small">{cell.ci95Low === null ? "no CI" : `${formatNumber(cell.ci95Low, digits)} to ${formatNumber(cell.ci95High, digits)}`}</span></> : "—"}
                  </td>
                );
              })}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

export function GroupStatisticsTable({ result }: { result: ClimatologyResult }) {
  const unit = result.metric.unit;
  const digits = digitsForUnit(unit);
  return (
    <div className="table-wrap" role="region" aria-label="Groups" tabIndex={0}>
      <table>
        <caption>{result.metric.label.charAt(0).toUpperCase() + result.metric.label.slice(1)} per group, in {unit}. IQR: lower to upper quartile; CI: t-based 95 % interval of the mean.</caption>
        <thead>
          <tr>
            <th scope="col">Group</th>
            <th scope="col" className="num">Flights (n)</th>
            <th scope="col" className="num">Mean ({unit})</th>
            <th scope="col" className="num">SD ({unit})</th>
            <th scope="col" className="num">SEM ({unit})</th>
            <th scope="col" className="num">Median ({unit})</th>
            <th scope="col" className="num">IQR ({unit})</th>
            <th scope="col" className="num">Min ({unit})</th>
            <th scope="col" className="num">Max ({unit})</th>
            <th scope="col" className="num">95 % CI of mean ({unit})</th>
          </tr>
        </thead>
        <tbody>
          {result.groups.map((g) => (
            <tr key={g.key}>
              <th scope="row">{g.label}</th>
              <StatCells stats={g} digits={digits} />
            </tr>
          ))}
          {result.groups.length > 1 && (
            <tr>
              <th scope="row">All groups</th>
              <StatCells stats={result.overall} digits={digits} />
            </tr>
          )}
        </tbody>
      </table>
    </div>
  );
}

/** Flights listed per group on the page (about eight DOM nodes each); the JSON download lists them all. */
const SHOWN_FLIGHTS = 50;

/** The contributing flights of one group, each linking to its flight page. */
export function GroupFlights({ group, unit }: { group: ClimatologyGroup; unit: string }) {
  const digits = digitsForUnit(unit);
  const shown = group.flights.slice(0, SHOWN_FLIGHTS);
  return (
    <details className="group-flights">
      <summary>{group.label}: {group.flights.length} flight{group.flights.length === 1 ? "" : "s"}</summary>
      <div className="table-wrap" role="region" aria-label={`Flights in ${group.label}`} tabIndex={0}>
        <table>
          <thead>
            <tr>
              <th scope="col">Flight</th>
              <th scope="col">Launch (UTC)</th>
              <th scope="col" className="num">Local hour</th>
              <th scope="col">Site</th>
              <th scope="col">School</th>
              <th scope="col" className="num">Value ({unit})</th>
            </tr>
          </thead>
          <tbody>
            {shown.map((f) => (
              <tr key={f.flightId}>
                <td><Link href={`/flights/${f.flightId}`}>{f.title}</Link></td>
                <td className="nowrap">{formatUtc(f.launchAtUtc)}</td>
                <td className="num">{formatLocalHour(f.localHour)}</td>
                <td>{f.siteName}</td>
                <td>{f.schoolName}</td>
                <td className="num">{formatNumber(f.value, digits)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {group.flights.length > SHOWN_FLIGHTS && <p className="muted small">The first {SHOWN_FLIGHTS} are listed here; the JSON download lists all {group.flights.length}.</p>}
    </details>
  );
}

const OUTCOME_WORDS: Record<ClaimCheckResult["outcome"], string> = {
  supported: "Supported",
  "not-shown": "Not shown",
  consistent: "Consistent with the data",
  contradicted: "Contradicted",
  equivalent: "Within the stated tolerance",
  inconclusive: "Neither shown",
  undetermined: "Cannot be tested",
};

function pText(p: number | null): string {
  if (p === null) return "—";
  return p < 0.001 ? "< 0.001" : p.toFixed(p < 0.01 ? 4 : 3);
}

function intervalText(low: number | null, high: number | null, digits: number, unit: string): string {
  if (low === null && high === null) return "—";
  if (low === null) return `below ${formatNumber(high, digits)} ${unit}`;
  if (high === null) return `above ${formatNumber(low, digits)} ${unit}`;
  return `${formatNumber(low, digits)} to ${formatNumber(high, digits)} ${unit}`;
}

/** The claim check: verdict first, then the numbers behind it and the caveats. */
export function ClaimResult({ claim, statement }: { claim: ClaimCheckResult; statement: string }) {
  const unit = claim.unit;
  const digits = claim.digits;
  const outcomeClass =
    claim.outcome === "supported" || claim.outcome === "consistent" || claim.outcome === "equivalent"
      ? "notice-ok"
      : claim.outcome === "undetermined" || claim.outcome === "inconclusive"
        ? "notice-warn"
        : "notice-error";
  return (
    <section aria-labelledby="claim-heading" className="claim-result">
      <h2 id="claim-heading">Claim check</h2>
      <p className="claim-statement"><strong>Claim:</strong> {statement}</p>
      <div className={`notice ${outcomeClass}`} role="status" aria-label="Verdict">
        <p><strong>Verdict: {OUTCOME_WORDS[claim.outcome]}.</strong> {claim.verdict}</p>
      </div>
      {claim.caveats.length > 0 && (
        <div className="notice notice-warn" aria-label="Caveats">
          <p><strong>Caveats</strong></p>
          <ul>{claim.caveats.map((c) => <li key={`${c.code}-${c.message}`}>{c.message}</li>)}</ul>
        </div>
      )}
      <dl className="facts" aria-label="Claim check numbers">
        <div><dt>Test</dt><dd>{claim.test}{claim.alternative === "two-sided" ? ", two-sided" : `, one-sided (${claim.alternative})`}</dd></div>
        {claim.groups.map((g, i) => (
          <div key={g.label}><dt>{claim.kind === "two-group" ? `Group ${i === 0 ? "A" : "B"} (${g.label})` : "Sample"}</dt><dd>n = {g.n}, mean {formatNumber(g.mean, digits)} {unit}, SD {formatNumber(g.sd, digits)} {unit}</dd></div>
        ))}
        <div><dt>{claim.kind === "two-group" ? "Estimate (A − B)" : "Estimate (mean)"}</dt><dd>{formatNumber(claim.estimate, digits)} {unit}</dd></div>
        <div><dt>95 % confidence interval</dt><dd>{intervalText(claim.ci95.low, claim.ci95.high, digits, unit)}</dd></div>
        <div><dt>t statistic</dt><dd>{formatNumber(claim.t, 3)} (df {formatNumber(claim.df, 1)})</dd></div>
        <div><dt>p-value</dt><dd>{pText(claim.p)}</dd></div>
        {claim.equivalence && (
          <div>
            <dt>Equivalence (two one-sided tests, ±{formatNumber(claim.tolerance, digits)} {unit})</dt>
            <dd>p {pText(claim.equivalence.p)}, {Math.round(claim.equivalence.interval.level * 100)} % CI {intervalText(claim.equivalence.interval.low, claim.equivalence.interval.high, digits, unit)}</dd>
          </div>
        )}
        {claim.rankCheck && <div><dt>Mann–Whitney check</dt><dd>U = {formatNumber(claim.rankCheck.u, 1)}, p {pText(claim.rankCheck.p)} ({claim.rankCheck.method})</dd></div>}
        <div><dt>Effect size (Hedges&apos; g)</dt><dd>{formatNumber(claim.hedgesG, 2)}</dd></div>
        <div><dt>Minimum detectable difference (80 % power, α = {claim.alpha})</dt><dd>{formatNumber(claim.minimumDetectableDifference, digits)} {unit}</dd></div>
      </dl>
    </section>
  );
}
