import type { Metadata } from "next";
import Link from "next/link";
import { restoreFlightAction } from "@/app/flights/[id]/actions";
import { getViewer } from "@/app/_lib/viewer";
import { auditSchoolIds } from "@/lib/auth/permissions";
import { listAuditEvents, listDeletedFlights } from "@/lib/query/accounts";

export const metadata: Metadata = { title: "Audit log" };

const PAGE_SIZE = 50;

export default async function AuditPage({ searchParams }: { searchParams: Promise<{ page?: string }> }) {
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
  const page = Math.max(1, Number((await searchParams).page ?? "1") || 1);
  const [{ total, events }, deleted] = await Promise.all([listAuditEvents(scope, { page, pageSize: PAGE_SIZE }), listDeletedFlights(scope)]);
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
      <h2>Events ({total})</h2>
      <div className="table-wrap">
        <table>
          <thead><tr><th scope="col">When (UTC)</th><th scope="col">Who</th><th scope="col">Action</th><th scope="col">What</th><th scope="col">Details</th></tr></thead>
          <tbody>
            {events.map((e) => (
              <tr key={e.id}>
                <td>{e.at.slice(0, 19).replace("T", " ")}</td>
                <td>{e.actorLabel || e.actorUserId || "—"}</td>
                <td>{e.action}</td>
                <td>{e.entityType === "flight" ? <Link href={`/flights/${e.entityId}`}>{e.entityId}</Link> : `${e.entityType} ${e.entityId}`}</td>
                <td><code className="small">{e.details ?? ""}</code></td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <p className="pager">
        {page > 1 ? <Link href={`/audit?page=${page - 1}`}>Newer</Link> : null} {page * PAGE_SIZE < total ? <Link href={`/audit?page=${page + 1}`}>Older</Link> : null}
      </p>
    </>
  );
}
