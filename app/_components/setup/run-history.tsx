import type { RunHistory } from "@/lib/query/setup-pages";
import { describeChange } from "./change-words";
import { ReanalyseButton } from "./reanalyse-button";

const km = (m: number | null) => (m === null ? "—" : (m / 1000).toFixed(2));
const two = (n: number | null) => (n === null ? "—" : n.toFixed(2));

/**
 * A flight's analysis runs, newest first, each with what changed against the run before it
 * (tropopause moved by N m, lapse rate by N K/km, calibration/layout/parameters/version changed),
 * and the "Re-analyse this flight" button. Old runs are kept; one is current.
 */
export function RunHistoryPanel({ history }: { history: RunHistory }) {
  return (
    <div>
      <h2>Run history</h2>
      <div className="table-wrap" role="region" aria-label="Run history" tabIndex={0}>
        <table>
          <thead>
            <tr>
              <th scope="col">Created (UTC)</th>
              <th scope="col">Reason</th>
              <th scope="col">Version</th>
              <th scope="col" className="num">Tropopause (km)</th>
              <th scope="col" className="num">Lapse rate (K/km)</th>
              <th scope="col">Changed from the run before</th>
              <th scope="col">Levels</th>
            </tr>
          </thead>
          <tbody>
            {history.runs.map((run) => {
              const words = run.change ? describeChange(run.change) : [];
              return (
                <tr key={run.id}>
                  <td className="nowrap">{run.createdAt.slice(0, 16).replace("T", " ")} {run.isCurrent && <span className="flag flag-current">current</span>}</td>
                  <td>{run.reason}</td>
                  <td>{run.analysisVersion}</td>
                  <td className="num">{km(run.tropopauseAltitudeM)}</td>
                  <td className="num">{two(run.troposphericLapseRateKPerKm)}</td>
                  <td>{run.change ? (words.length ? words.join("; ") : "same inputs, same numbers") : <span className="muted">first run</span>}</td>
                  <td><a href={`/api/v1/flights/${history.flightId}/levels?run=${run.id}`}>JSON</a></td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      {history.mayReanalyse && <ReanalyseButton flightId={history.flightId} />}
    </div>
  );
}
