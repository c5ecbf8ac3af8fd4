import type { Metadata } from "next";
import Link from "next/link";
import { ClimatologyQueryError, getClimatologyCached, type ClimatologyResult } from "@/lib/query/climatology";
import { climatologySearchParams, parseClimatologyQuery, searchRecord, type ClimatologyQuery } from "@/lib/query/climatology-params";
import { listSchoolsAndSites } from "@/lib/query/setup";
import { getViewer } from "@/app/_lib/viewer";
import { formatNumber } from "@/app/_lib/format";
import { claimDigits, formatClaimNumber } from "@/lib/stats/claims";
import { ClimatologyQueryForm, METRIC_CHOICES } from "@/app/_components/climatology/query-form";
import { HEIGHT_REFERENCE_WORDS } from "@/lib/analysis/band-coverage";
import { ClaimResult, CrossTableView, GroupFlights, GroupStatisticsTable, digitsForUnit } from "@/app/_components/climatology/result-tables";
import { GroupBoxPlot, GroupProfiles, MetricScatter } from "@/app/_components/climatology/climatology-charts";
import { buildClimatologyCharts } from "@/app/_components/climatology/chart-data";
import { ExportPanel } from "@/app/_components/export/export-panel";
import { HiddenFlightsNotice } from "@/app/_components/hidden-flights-notice";
import { countHiddenFlights } from "@/lib/query/flights";
import packageJson from "@/package.json" with { type: "json" };

export const metadata: Metadata = { title: "Climatology" };

type SearchParams = Promise<Record<string, string | string[] | undefined>>;

const SIDE_WORDS = { "two-sided": "equals", greater: "is greater than", less: "is less than" } as const;

/** The claim in words, as the form stated it. */
function claimStatement(query: ClimatologyQuery, result: ClimatologyResult): string {
  const metric = result.metric.label;
  if (query.claim === "one-sample") {
    // Same decimals as the verdict (lib/stats claimDigits/formatClaimNumber).
    const digits = result.claim?.digits ?? claimDigits([query.claimValue, query.claimTolerance]);
    const tolerance = query.claimTolerance === undefined ? "" : ` ± ${formatClaimNumber(query.claimTolerance, digits)}`;
    return `the mean ${metric} ${SIDE_WORDS[query.claimSide]} ${formatClaimNumber(query.claimValue ?? null, digits)}${tolerance} ${result.metric.unit}.`;
  }
  // Labels as the check used them (site and school ids replaced by names).
  const a = result.claim?.groups[0]?.label ?? query.groupA?.label ?? "A";
  const b = result.claim?.groups[1]?.label ?? query.groupB?.label ?? "B";
  const relation = query.claimSide === "greater" ? "is higher in" : query.claimSide === "less" ? "is lower in" : "differs between";
  return query.claimSide === "two-sided" ? `the mean ${metric} differs between ${a} (A) and ${b} (B).` : `the mean ${metric} ${relation} ${a} (A) than in ${b} (B).`;
}

export default async function ClimatologyPage({ searchParams }: { searchParams: SearchParams }) {
  const record = searchRecord(await searchParams);
  const [viewer, choices] = await Promise.all([getViewer(), listSchoolsAndSites()]);
  const parsed = parseClimatologyQuery(record);
  const hasQuery = Object.keys(record).length > 0;

  let result: ClimatologyResult | null = null;
  let problem: { message: string; field: string | null; code: string } | null = null;
  if (parsed.ok) {
    try {
      result = await getClimatologyCached(viewer, parsed.query);
    } catch (error) {
      if (!(error instanceof ClimatologyQueryError)) throw error;
      problem = { message: error.message, field: error.field, code: error.code };
    }
  }
  // Nothing to show while members-only flights exist: say so (the number only) instead of a bare "no result".
  const hiddenCount = problem?.code === "no-flights" ? await countHiddenFlights(viewer) : 0;
  const fieldErrors = parsed.ok ? (problem?.field ? { [problem.field]: [problem.message] } : {}) : parsed.fieldErrors;
  const search = parsed.ok ? climatologySearchParams(parsed.query, record).toString() : "";
  const charts = result && parsed.ok ? buildClimatologyCharts(result, parsed.query.chartX, digitsForUnit(result.metric.unit)) : null;
  const figure = result ? {
    scope: `Climatology query: ${search === "" ? "the default (every flight, grouped by season)" : decodeURIComponent(search.replace(/\+/g, " ")).split("&").join("; ")}`
      + (result.invented.contributingCount > 0 ? `; ${result.invented.contributingCount} of the flights are invented demo data` : ""),
    count: `n = ${result.overall.n} flight${result.overall.n === 1 ? "" : "s"} in ${result.groups.length} group${result.groups.length === 1 ? "" : "s"}`
      + (charts && charts.omittedPoints > 0 ? ` (points: an even sample of ${charts.plottedPoints})` : ""),
    version: packageJson.version,
  } : null;

  return (
    <>
      <h1>Climatology</h1>
      <p className="lead">
        Lapse rates, tropopause and inversions across flights, grouped by season, month, site or time of day, with a claim check.
        Everything you choose is kept in the address, so a query can be bookmarked and shared.
      </p>
      <ClimatologyQueryForm values={record} errors={fieldErrors} schools={choices.schools} sites={choices.sites} />

      {!parsed.ok && (
        <div className="notice notice-error" role="alert">
          <p><strong>The query could not be run.</strong> Please correct:</p>
          <ul>{Object.entries(parsed.fieldErrors).map(([field, messages]) => <li key={field}>{field}: {messages.join("; ")}</li>)}</ul>
        </div>
      )}
      {hiddenCount > 0 && <HiddenFlightsNotice hiddenCount={hiddenCount} />}
      {problem && (
        <div className={`notice ${problem.field === null ? "" : "notice-error"}`} role="alert">
          <p><strong>No result.</strong> {problem.message}.</p>
          <p>Widen the filters or <Link href="/climatology">start over</Link>.</p>
        </div>
      )}

      {result && parsed.ok && charts && figure && (
        <section aria-labelledby="result-heading">
          <h2 id="result-heading">{METRIC_CHOICES[parsed.query.metric]}{result.band ? `: ${formatNumber(result.band.baseM / 1000, 1)}–${formatNumber(result.band.topM / 1000, 1)} km ${HEIGHT_REFERENCE_WORDS[result.band.reference]} (${result.band.reference.toUpperCase()}), ${result.band.phase}` : ""}</h2>
          <p role="status" className="muted">
            {result.overall.n} flight{result.overall.n === 1 ? "" : "s"} in {result.groups.length} group{result.groups.length === 1 ? "" : "s"}
            {result.excludedCount > 0 ? `; ${result.excludedCount} matching flight${result.excludedCount === 1 ? "" : "s"} excluded` : ""}.
            {!hasQuery && " Showing the default query: every flight, grouped by season."}
          </p>
          {result.invented.contributingCount > 0 && (
            <p className="notice notice-warn" aria-label="Invented flights">
              {result.invented.contributingCount} of the {result.overall.n} contributing flights {result.invented.contributingCount === 1 ? "is" : "are"} invented
              (demo data generated by code, not measurements){result.invented.rule === "auto" ? ": the archive you can see holds no real flight yet" : ""}.
            </p>
          )}
          {result.invented.leftOutCount > 0 && (
            <p className="muted small" aria-label="Invented flights left out">
              {result.invented.leftOutCount} invented (demo) flight{result.invented.leftOutCount === 1 ? " was" : "s were"} left out
              {result.invented.rule === "auto" ? " because real flights exist" : ""}; choose &ldquo;Include them&rdquo; under Invented (demo) flights to take {result.invented.leftOutCount === 1 ? "it" : "them"} in.
            </p>
          )}
          {result.excluded.length > 0 && (
            <div className="notice notice-warn" aria-label="Excluded flights">
              <p>Excluded flights are counted, never read as zero:</p>
              <ul>{result.excluded.map((e) => <li key={e.reason}>{e.count} flight{e.count === 1 ? "" : "s"} excluded: {e.reason}</li>)}</ul>
            </div>
          )}
          <p className="actions">
            <Link className="button button-secondary" href={`/climatology${search ? `?${search}` : ""}`}>Link to this {result.claim ? "claim check" : "query"}</Link>
            <a className="button button-secondary" href={`/api/v1/climatology${search ? `?${search}` : ""}`}>Download as JSON</a>
          </p>
          {result.claim && <ClaimResult claim={result.claim} statement={claimStatement(parsed.query, result)} />}
          <h2>Groups</h2>
          <GroupStatisticsTable result={result} />
          {result.crossTable && (
            <>
              <h2>Cross-table</h2>
              <CrossTableView result={result} />
            </>
          )}
          <GroupBoxPlot charts={charts} figure={figure} />
          <h2>Against {parsed.query.chartX === "day-of-year" ? "day of year" : "launch hour"}</h2>
          <MetricScatter charts={charts} figure={figure} />
          <h2>Mean temperature profile per group</h2>
          <GroupProfiles charts={charts} figure={figure} />
          <h2>Contributing flights</h2>
          {parsed.query.flights === "none" ? (
            <p className="muted">Flight lists were left out (flights=none in the address).</p>
          ) : (
            result.groups.map((g) => <GroupFlights key={g.key} group={g} unit={result.metric.unit} />)
          )}
          <ExportPanel source="climatology" query={record} flightCount={result.overall.n} />
        </section>
      )}
    </>
  );
}
