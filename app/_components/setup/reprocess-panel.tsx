"use client";

import Link from "next/link";
import { useId, useRef, useState } from "react";
import { useRouter } from "next/navigation";
import type { ReprocessOutcome } from "@/lib/ingest/reprocess";
import type { ReprocessFlightRow } from "@/lib/query/setup-pages";
import { reprocessOneFlight } from "@/app/setup/actions";
import { describeChange } from "./change-words";

type Status = "waiting" | "running" | ReprocessOutcome["status"] | "stopped";

const STATUS_WORDS: Record<Status, string> = {
  waiting: "waiting",
  running: "re-analysing…",
  reprocessed: "re-analysed",
  "up-to-date": "already up to date",
  failed: "failed",
  stopped: "not run (stopped)",
};

const STATUS_CLASS: Record<Status, string> = {
  waiting: "status-queued",
  running: "status-uploading",
  reprocessed: "status-done",
  "up-to-date": "status-queued",
  failed: "status-failed",
  stopped: "status-queued",
};

/**
 * Lists the affected flights and re-analyses them one server action at a time, so progress shows
 * per flight and Stop takes effect between flights; ends with a summary.
 */
export function ReprocessPanel({ flights, defaultReason }: { flights: ReprocessFlightRow[]; defaultReason: string }) {
  const uid = useId();
  const router = useRouter();
  const [reason, setReason] = useState(defaultReason);
  const [force, setForce] = useState(false);
  const [state, setState] = useState<Record<string, { status: Status; outcome?: ReprocessOutcome; message?: string }>>({});
  const [running, setRunning] = useState(false);
  const [finished, setFinished] = useState(false);
  const stop = useRef(false);

  async function runOne(flightId: string) {
    setState((old) => ({ ...old, [flightId]: { status: "running" } }));
    try {
      const result = await reprocessOneFlight({ flightId, reason: reason.trim() || "re-analysis", force });
      if (result.ok) setState((old) => ({ ...old, [flightId]: { status: result.data.status, outcome: result.data, ...(result.data.message ? { message: result.data.message } : {}) } }));
      else setState((old) => ({ ...old, [flightId]: { status: "failed", message: result.message } }));
    } catch (error) {
      setState((old) => ({ ...old, [flightId]: { status: "failed", message: error instanceof Error ? error.message : String(error) } }));
    }
  }

  async function run(ids: string[]) {
    stop.current = false;
    setRunning(true);
    setFinished(false);
    setState((old) => ({ ...old, ...Object.fromEntries(ids.map((id) => [id, { status: "waiting" as Status }])) }));
    for (const [i, id] of ids.entries()) {
      if (stop.current) {
        setState((old) => ({ ...old, ...Object.fromEntries(ids.slice(i).map((rest) => [rest, { status: "stopped" as Status }])) }));
        break;
      }
      await runOne(id);
    }
    setRunning(false);
    setFinished(true);
    router.refresh();
  }

  const entries = flights.map((f) => state[f.id]);
  const done = entries.filter((e) => e && e.status !== "waiting" && e.status !== "running" && e.status !== "stopped").length;
  const started = entries.filter(Boolean).length;
  const count = (status: Status) => entries.filter((e) => e?.status === status).length;
  const failures = flights.filter((f) => state[f.id]?.status === "failed");

  if (flights.length === 0) return <p className="notice">No flights are affected.</p>;
  return (
    <div>
      <h2>Affected flights ({flights.length})</h2>
      <div className="form-grid">
        <div className="field">
          <label htmlFor={`${uid}-reason`}>Reason recorded with the new runs</label>
          <input id={`${uid}-reason`} type="text" value={reason} onChange={(e) => setReason(e.target.value)} disabled={running} />
        </div>
        <div className="field">
          <span className="label">Unchanged flights</span>
          <label><input type="checkbox" checked={force} onChange={(e) => setForce(e.target.checked)} disabled={running} /> Re-analyse even when nothing changed</label>
        </div>
      </div>
      <p className="actions">
        <button type="button" onClick={() => run(flights.map((f) => f.id))} disabled={running}>Re-analyse all {flights.length} flights</button>
        {running && <button type="button" className="button-secondary" onClick={() => { stop.current = true; }}>Stop after this flight</button>}
      </p>
      {started > 0 && (
        <p role="status" aria-live="polite">
          <progress max={started} value={done} aria-label="Re-analysis progress" /> {done} of {started} done
        </p>
      )}
      {finished && (
        <div className={failures.length ? "notice notice-warn" : "notice notice-ok"} aria-label="Re-analysis summary" role="group">
          <p><strong>Summary:</strong> {count("reprocessed")} re-analysed, {count("up-to-date")} already up to date, {count("failed")} failed{count("stopped") ? `, ${count("stopped")} not run (stopped; run again to resume)` : ""}.</p>
          {failures.length > 0 && (
            <ul>{failures.map((f) => <li key={f.id}><Link href={`/flights/${f.id}`}>{f.title}</Link>: {state[f.id]?.message ?? "failed"} (it stays on its previous run)</li>)}</ul>
          )}
        </div>
      )}
      <div className="table-wrap" role="region" aria-label="Affected flights" tabIndex={0}>
        <table>
          <thead>
            <tr>
              <th scope="col">Flight</th>
              <th scope="col">School</th>
              <th scope="col">Launch (UTC)</th>
              <th scope="col" className="num">Tropopause now (km)</th>
              <th scope="col" className="num">Lapse rate now (K/km)</th>
              <th scope="col">Status</th>
              <th scope="col">What changed</th>
              <th scope="col">Action</th>
            </tr>
          </thead>
          <tbody>
            {flights.map((f) => {
              const entry = state[f.id];
              const status = entry?.status;
              return (
                <tr key={f.id}>
                  <td className="title-cell"><Link href={`/flights/${f.id}`}>{f.title}</Link></td>
                  <td>{f.schoolName}</td>
                  <td className="nowrap">{f.launchAtUtc.slice(0, 16).replace("T", " ")}</td>
                  <td className="num">{f.currentRun?.tropopauseAltitudeM == null ? "—" : (f.currentRun.tropopauseAltitudeM / 1000).toFixed(2)}</td>
                  <td className="num">{f.currentRun?.troposphericLapseRateKPerKm == null ? "—" : f.currentRun.troposphericLapseRateKPerKm.toFixed(2)}</td>
                  <td className={status ? STATUS_CLASS[status] : "status-queued"}>{status ? STATUS_WORDS[status] : "—"}{entry?.status === "failed" && entry.message ? `: ${entry.message}` : ""}</td>
                  <td>{entry?.outcome?.change ? describeChange(entry.outcome.change).join("; ") || "no change in the numbers" : ""}</td>
                  <td><button type="button" className="button-secondary" aria-label={`Re-analyse ${f.title}`} disabled={running} onClick={async () => { setRunning(true); await runOne(f.id); setRunning(false); setFinished(true); router.refresh(); }}>Re-analyse</button></td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
    </div>
  );
}
