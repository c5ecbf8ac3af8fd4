/**
 * Reads that the setup writers own and the setup pages show: the program's analysis parameters (the
 * pipeline reads them for every analysis) and what still uses a setup item (the guarded delete refuses
 * on it). They live beside their writers so lib/query never imports lib/ingest (lib/lint/layers-rule.mjs).
 */
import { getDb, type Db } from "../db/index.ts";
import { DEFAULT_PARAMETERS } from "./schemas.ts";
import { setupItemUses, type SetupItemKind } from "./setup-more.ts";
import { getProgramParameters } from "./store.ts";

/** The program's analysis parameters now, whether they were ever set, and the built-in defaults. */
export async function getProgramSettings(db: Db = getDb()) {
  const [row, parameters] = await Promise.all([db.programSettings.findUnique({ where: { id: 1 } }), getProgramParameters(db)]);
  // A row made only to store invitationOnly holds `{}`: its parameters are still the built-in ones.
  const ownParameters = row !== null && typeof row.analysisParameters === "object" && row.analysisParameters !== null && Object.keys(row.analysisParameters).length > 0;
  return { parameters, defaults: DEFAULT_PARAMETERS, updatedAt: ownParameters ? row.updatedAt.toISOString() : null, isDefault: !ownParameters, invitationOnly: row?.invitationOnly === true };
}

/** What uses a setup item ("3 flights"), for its page's delete button; empty when it can be deleted. */
export async function getSetupItemUses(kind: SetupItemKind, id: string, db: Db = getDb()): Promise<string[]> {
  return setupItemUses(db, kind, id);
}
