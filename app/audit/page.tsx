import type { Metadata } from "next";
import Link from "next/link";
import { restoreFlightAction } from "@/app/flights/[id]/actions";
import { getViewer } from "@/app/_lib/viewer";
import { formatUtc } from "@/app/_lib/format";
import { auditSchoolIds } from "@/lib/auth/permissions";
import { listDeletedFlights } from "@/lib/query/accounts";
import { searchParamsToRecord } from "@/lib/query/archive-filter";
import { auditFilterChoices, isNamedEntityType, listAuditLog, type AuditEventRow } from "@/lib/query/audit";
import { auditHref, parseAuditFilter } from "@/lib/query/audit-params";

export const metadata: Metadata = { title: "Audit log" };

type SearchParams = Promise<Record<string, string | string[] | undefined>>;

function EntityCell({ event }: { event: AuditEventRow }) {
  const { kind, id, name } = event.entity;
  if (kind === "flight" && name !== null) return <Link href={`/flights/${id}`}>{name}</Link>;
  return name !== null ? <>{kind} “{name}”</> : <span className="muted">{kind} {id}{isNamedEntityType(kind) ? " (no longer stored)" : ""}</span>;
}

export default async function AuditPage({ searchParams }: { searchParams: SearchParams }) {
  const viewer = await getViewer();
  const scope = auditSchoolIds(viewer);
  if (scope !== null && scope.length === 0) {
    return (
      <>
        <h1>Audit log</h1>
        <p className="notice notice-error" role="alert">
          {viewer.kind === "member" && viewer.tokenScopes ? "API tokens cannot open the audit log; sign in instead." : "The audit log is for program and school admins."}
        </p>
      </>
    );
  }
  const { filter, problems } = parseAuditFilter(searchParamsToRecord(await searchParams));
  const [log, choices, deleted] = await Promise.all([listAuditLog(scope, filter), auditFilterChoices(scope), listDeletedFlights(scope)]);
  const filtered = filter.school !== undefined || filter.person !== undefined || filter.action !== undefined || filter.from !== undefined || filter.to !== undefined;
  const showDemo = filter.demo === "show";
  return (
    <>
      <h1>Audit log</h1>
      <h2>Deleted flights</h2>
      {deleted.length === 0 ? <p className="muted">No deleted flights.</p> : (
        <ul>
          {deleted.map((f) => (
            <li key={f.id}>
              {f.title} ({f.school.name}), deleted {f.deletedAt?.toISOString().slice(0, 16).replace("T", " ")} UTC{" "}
              <form action={restoreFlightAction} style={{ display: "inline" }}>
                <input type="hidden" name="flightId" value={f.id} />
                <button className="button button-secondary" type="submit">Restore</button>
              </form>
            </li>
          ))}
        </ul>
      )}
      <h2>Events</h2>
      <form className="filters" method="get" action="/audit" aria-label="Filter the audit log">
        <div className="field">
          <label htmlFor="a-school">School</label>
          <select id="a-school" name="school" defaultValue={filter.school ?? ""}>
            <option value="">Any school</option>
            {choices.schools.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
          </select>
        </div>
        <div className="field">
          <label htmlFor="a-person">Person</label>
          <select id="a-person" name="person" defaultValue={filter.person ?? ""}>
            <option value="">Anyone</option>
            {choices.people.map((p) => <option key={p.id} value={p.id}>{p.name}</option>)}
          </select>
        </div>
        <div className="field">
          <label htmlFor="a-action">Action</label>
          <select id="a-action" name="action" defaultValue={filter.action ?? ""}>
            <option value="">Any action</option>
            {choices.actions.map((a) => <option key={a} value={a}>{a}</option>)}
          </select>
        </div>
        <div className="field">
          <label htmlFor="a-from">From (UTC day)</label>
          <input id="a-from" name="from" type="date" defaultValue={filter.from ?? ""} />
        </div>
        <div className="field">
          <label htmlFor="a-to">To (UTC day, included)</label>
          <input id="a-to" name="to" type="date" defaultValue={filter.to ?? ""} />
        </div>
        <div className="field">
          <label htmlFor="a-demo">Demo loader events</label>
          <select id="a-demo" name="demo" defaultValue={filter.demo ?? ""}>
            <option value="">One row per day</option>
            <option value="show">Show each event</option>
          </select>
        </div>
        <div className="actions">
          <button type="submit">Apply</button>
          <Link href="/audit">Clear</Link>
        </div>
      </form>
      {problems.length > 0 && (
        <div className="notice notice-warn" role="alert">
          Some filter values were not understood:
          <ul>{problems.map((p) => <li key={p}>{p}</li>)}</ul>
        </div>
      )}
      <p className="muted" role="status">
        {log.eventCount} event{log.eventCount === 1 ? "" : "s"}{filtered ? " matching the filter" : ""}
        {log.demoEventCount > 0 ? `, and ${log.demoEventCount} by the demo loader${showDemo ? " (shown one by one)" : " (one row per day)"}` : ""}. Page {log.page} of {log.pageCount}.
      </p>
      {log.rows.length === 0 ? (
        <p className="notice">No events{filtered ? " match this filter" : " yet"}.{filtered ? <> <Link href="/audit">Clear the filter</Link>.</> : null}</p>
      ) : (
        <div className="table-wrap" role="region" aria-label="Audit events" tabIndex={0}>
          <table>
            <thead><tr><th scope="col">When</th><th scope="col">Who</th><th scope="col">School</th><th scope="col">Action</th><th scope="col">What</th><th scope="col">Details</th></tr></thead>
            <tbody>
              {log.rows.map((row) => row.type === "demo-day" ? (
                <tr key={`demo-${row.day}`} className="muted">
                  <td className="nowrap">{row.day}</td>
                  <td>demo loader</td>
                  <td>—</td>
                  <td>{row.actions.join(", ")}</td>
                  <td colSpan={2}>
                    {row.count} invented demo event{row.count === 1 ? "" : "s"} this day.{" "}
                    <Link href={auditHref(filter, { demo: "show", from: row.day, to: row.day, page: undefined })}>Show them</Link>
                  </td>
                </tr>
              ) : (
                <tr key={row.id}>
                  <td className="nowrap">{formatUtc(row.at)}</td>
                  <td>{row.actor}</td>
                  <td>{row.school?.name ?? (row.school ? <span className="muted">{row.school.id}</span> : "—")}</td>
                  <td>{row.action}</td>
                  <td><EntityCell event={row} /></td>
                  <td>
                    {row.details.length === 0 ? "—" : (
                      <dl className="audit-details">
                        {row.details.map((d) => <div key={d.key}><dt>{d.label}</dt><dd>{d.text}</dd></div>)}
                      </dl>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
      <nav className="pager" aria-label="Audit log pages">
        {log.page > 1 ? <Link href={auditHref(filter, { page: String(log.page - 1) })}>Newer</Link> : <span aria-disabled="true">Newer</span>}
        <span>Page {log.page} of {log.pageCount}</span>
        {log.page < log.pageCount ? <Link href={auditHref(filter, { page: String(log.page + 1) })}>Older</Link> : <span aria-disabled="true">Older</span>}
      </nav>
    </>
  );
}
