"use client";

import { useState } from "react";
import { useRouter } from "next/navigation";
import { deleteSetupItemAction } from "@/app/setup/actions";
import type { SetupItemKind } from "@/lib/ingest/setup-more";

/**
 * "Delete this …" for a setup item entered by mistake. Asks first; the server refuses an item that
 * flights or runs use and says which (such an item can be corrected instead).
 */
export function DeleteItemButton({ kind, id, name, usedBy }: { kind: SetupItemKind; id: string; name: string; usedBy: string[] }) {
  const router = useRouter();
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState<string | null>(null);

  if (usedBy.length) {
    return <p className="muted small">In use by {usedBy.join(" and ")}, so it cannot be deleted; correct it above instead.</p>;
  }

  async function remove() {
    if (!window.confirm(`Delete ${kind} ${name}? This cannot be undone.`)) return;
    setBusy(true);
    setError(null);
    const result = await deleteSetupItemAction({ kind, id });
    setBusy(false);
    if (!result.ok) { setError(result.message); return; }
    router.push(result.data.nextPath);
  }

  return (
    <div>
      <p className="actions">
        <button type="button" className="button-danger" onClick={remove} disabled={busy}>{busy ? "Deleting…" : `Delete this ${kind}`}</button>
      </p>
      {error && <p className="notice notice-error" role="alert">{error}</p>}
    </div>
  );
}
