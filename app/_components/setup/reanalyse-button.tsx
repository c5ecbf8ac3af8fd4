"use client";

import { useState } from "react";
import { useRouter } from "next/navigation";
import { reprocessOneFlight } from "@/app/setup/actions";
import { describeChange } from "./change-words";

/** "Re-analyse this flight": a new run from the stored raw bytes with today's calibration, layout, parameters and site. */
export function ReanalyseButton({ flightId }: { flightId: string }) {
  const router = useRouter();
  const [busy, setBusy] = useState(false);
  const [message, setMessage] = useState<{ text: string; kind: "ok" | "error" | "info" } | null>(null);

  async function run(force: boolean) {
    setBusy(true);
    setMessage(null);
    const result = await reprocessOneFlight({ flightId, reason: force ? "re-analysis requested (forced)" : "re-analysis requested", force });
    setBusy(false);
    if (!result.ok) { setMessage({ text: result.message, kind: "error" }); return; }
    const outcome = result.data;
    if (outcome.status === "failed") setMessage({ text: `Re-analysis failed; the flight stays on its previous run. ${outcome.message ?? ""}`, kind: "error" });
    else if (outcome.status === "up-to-date") setMessage({ text: "Already up to date: the current run used today's calibration, layout, parameters, site and analysis version.", kind: "info" });
    else {
      const words = outcome.change ? describeChange(outcome.change) : [];
      setMessage({ text: `Re-analysed as a new run${words.length ? `: ${words.join("; ")}` : ""}.`, kind: "ok" });
      router.refresh();
    }
  }

  return (
    <div>
      <p className="actions">
        <button type="button" onClick={() => run(false)} disabled={busy}>{busy ? "Re-analysing…" : "Re-analyse this flight"}</button>
        {message?.kind === "info" && <button type="button" className="button-secondary" onClick={() => run(true)} disabled={busy}>Re-analyse anyway</button>}
      </p>
      {message && <p className={message.kind === "error" ? "notice notice-error" : message.kind === "ok" ? "notice notice-ok" : "notice"} role="status">{message.text}</p>}
    </div>
  );
}
