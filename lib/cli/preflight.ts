import type { Db } from "../db/index.ts";

/**
 * Why this database must not be served or changed yet, in words for the operator; null when it may.
 * A restore commits a RestoreMarker row before it writes and deletes it in the transaction that
 * commits the archive (lib/export/backup.ts), so a marker left behind means a restore was interrupted:
 * the database holds none of that backup, and serving it (or loading the demo archive into it) would
 * hide that. `npm start` calls this before anything else; so does every CLI command that reads or
 * writes the archive.
 */
export async function checkBeforeServing(db: Db): Promise<string | null> {
  let markers: Array<{ backupFile: string; startedAtUtc: Date }>;
  try {
    markers = await db.restoreMarker.findMany({ orderBy: { startedAtUtc: "desc" }, take: 1 });
  } catch (error) {
    // A database migrated before the marker table existed cannot have an interrupted restore.
    if ((error as { code?: unknown }).code === "P2021") return null;
    throw error;
  }
  const marker = markers[0];
  if (!marker) return null;
  return [
    `A restore of ${marker.backupFile} started at ${marker.startedAtUtc.toISOString()} did not finish; the database holds none of that backup and is not served.`,
    `Finish it with \`npm run lapsebank -- restore ${quoteForShell(marker.backupFile)}\` (it loads the whole backup or nothing),`,
    "or clear the database with `npm run lapsebank -- reset --yes`.",
  ].join("\n");
}

function quoteForShell(text: string): string {
  return /^[\w./+-]+$/.test(text) ? text : `'${text.replaceAll("'", "'\\''")}'`;
}
