import { createHash } from "node:crypto";
import fs from "node:fs";
import { unzipSync, zipSync, type Zippable } from "fflate";

/** A backup's manifest as the tests edit it (only the parts they touch are typed). */
export interface EditableManifest {
  formatVersion: number;
  tables: Array<{ model: string; rows: number; parts: string[] }>;
  rawFiles: number;
  sha256?: Record<string, string>;
  [key: string]: unknown;
}

/** Every entry of a backup zip, inflated (small test backups only). */
export function readBackup(file: string): { files: Record<string, Uint8Array>; manifest: EditableManifest } {
  const files = unzipSync(new Uint8Array(fs.readFileSync(file)));
  const manifest = JSON.parse(new TextDecoder().decode(files["manifest.json"])) as EditableManifest;
  return { files, manifest };
}

export const sha256Hex = (bytes: Uint8Array) => createHash("sha256").update(bytes).digest("hex");

/**
 * Writes the entries and the manifest as a valid zip (fresh CRC-32s). With `resign`, every SHA-256 the
 * manifest lists is recomputed from the entries, so a deliberate edit passes the checksum check and
 * reaches the check under test; without it the manifest keeps the original checksums. Entries named
 * in `stored` are written uncompressed, so a test can find and damage their bytes in the file.
 */
export function writeBackup(file: string, files: Record<string, Uint8Array>, manifest: EditableManifest, options: { resign?: boolean; stored?: string[] } = {}): void {
  const entries = { ...files };
  delete entries["manifest.json"];
  const out: EditableManifest = { ...manifest };
  if (options.resign && manifest.sha256) {
    out.sha256 = Object.fromEntries(Object.keys(manifest.sha256).map((name) => [name, sha256Hex(entries[name] ?? new Uint8Array(0))]));
  }
  const zippable: Zippable = {};
  for (const [name, bytes] of Object.entries(entries)) zippable[name] = options.stored?.includes(name) ? [bytes, { level: 0 }] : bytes;
  zippable["manifest.json"] = new TextEncoder().encode(`${JSON.stringify(out, null, 2)}\n`);
  fs.writeFileSync(file, zipSync(zippable, { level: 1 }));
}

/** The entry's text split into lines (the last, empty one dropped), and back. */
export const entryLines = (bytes: Uint8Array | undefined) => new TextDecoder().decode(bytes).split("\n").filter(Boolean);
export const linesEntry = (lines: string[]) => new TextEncoder().encode(lines.map((l) => `${l}\n`).join(""));
