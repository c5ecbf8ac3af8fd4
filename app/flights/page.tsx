import type { Metadata } from "next";
import Link from "next/link";
import { archiveFilterSchema, searchParamsToRecord, type ArchiveFilter } from "@/lib/query/archive-filter";
import { countHiddenFlights, listFlights } from "@/lib/query/flights";
import { parseDroppingProblems } from "@/lib/query/strict-params";
import { listSchoolsAndSites } from "@/lib/query/setup";
import { getViewer } from "@/app/_lib/viewer";
import { formatKmValue, formatLocalHour, formatNumber, formatSeason, formatUtc } from "@/app/_lib/format";
import { ArchiveFilterForm } from "./_components/archive-filter-form";
import { ExportPanel } from "@/app/_components/export/export-panel";
import { Pager } from "./_components/pager";
import { SortHeader } from "./_components/sort-header";
import { HiddenFlightsNotice } from "@/app/_components/hidden-flights-notice";

export const metadata: Metadata = { title: "Archive" };

type SearchParams = Promise<Record<string, string | string[] | undefined>>;

/**
 * Parses the URL filter; a field that does not validate is dropped (and reported) so one bad
 * value does not throw away the rest of the filter.
 */
function parseFilter(record: Record<string, string>): { filter: ArchiveFilter; problems: string[] } {
  const { value, problems } = parseDroppingProblems(archiveFilterSchema, record);
  return { filter: value, problems };
}

/** Parameters the app itself puts in the Archive address that are not part of the filter. */
const PAGE_ONLY_KEYS = ["deleted"];

/** The filter's own parameters: page-only ones and unknown ones left out (so links and exports carry none). */
function filterRecord(record: Record<string, string>, filter: ArchiveFilter): Record<string, string> {
  const known = new Set(Object.keys(archiveFilterSchema.shape));
  return Object.fromEntries(Object.entries(record).filter(([key]) => known.has(key) && (filter as Record<string, unknown>)[key] !== undefined));
}

const FILTER_KEYS = ["school", "site", "from", "to", "season"] as const;

export default async function ArchivePage({ searchParams }: { searchParams: SearchParams }) {
  const raw = searchParamsToRecord(await searchParams);
  const { filter, problems } = parseFilter(Object.fromEntries(Object.entries(raw).filter(([key]) => !PAGE_ONLY_KEYS.includes(key))));
  const record = filterRecord(raw, filter);
  const viewer = await getViewer();
  const [result, choices] = await Promise.all([listFlights(viewer, filter), listSchoolsAndSites()]);
  const filtered = FILTER_KEYS.some((key) => filter[key] !== undefined);
  const hiddenCount = result.total === 0 && !filtered ? await countHiddenFlights(viewer) : 0;
  const pageCount = Math.max(1, Math.ceil(result.total / result.pageSize));
  const firstRow = result.total === 0 ? 0 : (result.page - 1) * result.pageSize + 1;
  const lastRow = Math.min(result.total, result.page * result.pageSize);

  return (
    <>
      <h1>Archive</h1>
      <ArchiveFilterForm key={new URLSearchParams(record).toString()} values={{ ...record, sort: filter.sort, pageSize: String(filter.pageSize) }} schools={choices.schools} sites={choices.sites} />
      {problems.length > 0 && (
        <div className="notice notice-warn" role="status">
          Some filter values were not understood:
          <ul>{problems.map((p) => <li key={p}>{p}</li>)}</ul>
        </div>
      )}
      {result.total === 0 ? (
        filtered ? (
          <p className="notice">No flights match this filter. <Link href="/flights">Clear the filter</Link>.</p>
        ) : hiddenCount > 0 ? (
          <HiddenFlightsNotice hiddenCount={hiddenCount} />
        ) : (
          <div className="notice">
            <p><strong>The archive is empty.</strong></p>
            <p><Link className="button" href="/upload">Upload a flight</Link> to start it.</p>
          </div>
        )
      ) : (
        <>
          <p className="muted" role="status">
            Flights {firstRow}–{lastRow} of {result.total}{filtered ? " matching the filter" : ""}.
          </p>
          <div className="table-wrap" role="region" aria-label="Flights" tabIndex={0}>
            <table className="archive-table">
              <thead>
                <tr>
                  <SortHeader label="Launch (UTC / local)" choice={{ first: "launch-desc", second: "launch-asc" }} current={filter.sort} record={record} />
                  <SortHeader label="Title" choice={{ first: "title" }} current={filter.sort} record={record} className="title-cell" />
                  <th scope="col">School</th>
                  <th scope="col">Site</th>
                  <th scope="col">Season</th>
                  <SortHeader label="Tropopause (km)" choice={{ first: "tropopause-desc", second: "tropopause-asc" }} current={filter.sort} record={record} className="num" />
                  <SortHeader label="Lapse rate, troposphere (K/km)" choice={{ first: "lapse-desc", second: "lapse-asc" }} current={filter.sort} record={record} className="num" />
                  <th scope="col" className="num">Max altitude (km)</th>
                  <th scope="col">Surface inversion</th>
                  <th scope="col">QC</th>
                </tr>
              </thead>
              <tbody>
                {result.rows.map((row) => (
                  <tr key={row.id}>
                    <td className="nowrap">
                      {formatUtc(row.launchAtUtc)}
                      <br />
                      <span className="muted small">{formatLocalHour(row.localHour)} local</span>
                    </td>
                    <td className="title-cell"><Link href={`/flights/${row.id}`}>{row.title}</Link>{row.synthetic && <span className="muted small"> (demo)</span>}</td>
                    <td>{row.schoolName}</td>
                    <td>{row.siteName}</td>
                    <td className="nowrap">{formatSeason(row.season, row.seasonName)}</td>
                    <td className="num">{formatKmValue(row.tropopauseAltitudeM, 2)}</td>
                    <td className="num">{formatNumber(row.troposphericLapseRateKPerKm, 2)}</td>
                    <td className="num">{formatKmValue(row.maxAltitudeM, 1)}</td>
                    <td>{row.hasSurfaceInversion === null ? "—" : row.hasSurfaceInversion ? "yes" : "no"}</td>
                    <td>{row.qcFlagged ? <span className="flag flag-warn">flagged</span> : <span className="flag flag-ok">ok</span>}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <Pager record={record} page={result.page} pageCount={pageCount} />
          <ExportPanel source="archive" query={record} flightCount={result.total} />
        </>
      )}
    </>
  );
}
