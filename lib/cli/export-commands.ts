/**
 * CLI commands for exports and whole-archive backups:
 *   export [--source archive|flight|climatology] [--format csv|json|package|netcdf] [--table NAME] [--raw]
 *          [--licence ID] [--title TEXT] [--flight ID] [--query "k=v&k=v"] [--out FILE]
 *   backup <file>      restore <file>
 * The CLI acts as the local user (sees every flight), like the other commands.
 */
import fs from "node:fs";
import { parseArgs } from "node:util";
import { getDbHandle } from "../db/index.ts";
import { LOCAL_VIEWER } from "../auth/visibility.ts";
import { createExport, ExportRequestError } from "../export/export.ts";
import { backupArchive, restoreArchive, RestoreRefused } from "../export/backup.ts";
import { checkBeforeServing } from "./preflight.ts";

export { EXPORT_HELP } from "./export-help.ts";

/**
 * Writes the chunks to `file`, each before asking for the next (so the export may reuse a chunk's
 * memory). A regular file is written under a ".part" name and renamed when complete, so a failed
 * export never leaves a truncated file under the requested name.
 */
async function writeChunks(file: string, chunks: AsyncIterable<Uint8Array>): Promise<void> {
  const special = fs.existsSync(file) && !fs.statSync(file).isFile(); // e.g. /dev/stdout
  const target = special ? file : `${file}.part`;
  const out = await fs.promises.open(target, "w");
  try {
    for await (const chunk of chunks) {
      for (let offset = 0; offset < chunk.length; ) offset += (await out.write(chunk, offset)).bytesWritten;
    }
  } catch (error) {
    await out.close();
    if (!special) await fs.promises.rm(target, { force: true });
    throw error;
  }
  await out.close();
  if (!special) await fs.promises.rename(target, file);
}

/** `export …`: returns the process exit code. */
export async function runExport(args: string[]): Promise<number> {
  const { values } = parseArgs({
    args,
    options: {
      source: { type: "string" }, format: { type: "string" }, table: { type: "string" }, raw: { type: "boolean", default: false },
      licence: { type: "string" }, title: { type: "string" }, flight: { type: "string" }, query: { type: "string", default: "" }, out: { type: "string" },
    },
  });
  const record: Record<string, string> = {};
  new URLSearchParams(values.query.replace(/^\?/, "")).forEach((value, key) => {
    record[key] = record[key] ? `${record[key]},${value}` : value;
  });
  for (const key of ["source", "format", "table", "licence", "title", "flight"] as const) {
    const value = values[key];
    if (value !== undefined) record[key] = value;
  }
  if (values.raw) record.raw = "yes";
  const problem = await checkBeforeServing(getDbHandle().db);
  if (problem) {
    console.error(problem);
    return 1;
  }
  const started = performance.now();
  let output;
  try {
    output = await createExport(getDbHandle(), LOCAL_VIEWER, record, { chunksDoneOnNext: true });
  } catch (error) {
    if (error instanceof ExportRequestError) {
      console.error(`export: ${error.message}`);
      return error.status === 404 ? 1 : 2;
    }
    throw error;
  }
  const file = values.out ?? output.fileName;
  await writeChunks(file, output.body);
  const seconds = (performance.now() - started) / 1000;
  console.log(`Wrote ${file} (${output.scope.flightIds.length} flight${output.scope.flightIds.length === 1 ? "" : "s"}, ${(fs.statSync(file).size / 1048576).toFixed(1)} MB) in ${seconds.toFixed(1)} s`);
  return 0;
}

/** `backup <file>`. */
export async function runBackup(args: string[]): Promise<number> {
  const { positionals } = parseArgs({ args, allowPositionals: true, options: {} });
  const file = positionals[0];
  if (!file || positionals.length > 1) {
    console.error("backup: name one output file, e.g. backup lapsebank-backup.zip");
    return 2;
  }
  const report = await backupArchive(getDbHandle().db, file, {
    onProgress: (table, rows) => process.stdout.write(`\rBacking up ${table}: ${rows} rows`.padEnd(60)),
  });
  process.stdout.write("\n");
  console.log(`Wrote ${file}: ${Object.entries(report.rowCounts).map(([t, n]) => `${t} ${n}`).join(", ")}`);
  return 0;
}

/** `restore <file>`. */
export async function runRestore(args: string[]): Promise<number> {
  const { positionals } = parseArgs({ args, allowPositionals: true, options: {} });
  const file = positionals[0];
  if (!file || positionals.length > 1) {
    console.error("restore: name one backup file, e.g. restore lapsebank-backup.zip");
    return 2;
  }
  if (!fs.existsSync(file)) {
    console.error(`restore: ${file} does not exist`);
    return 2;
  }
  try {
    const report = await restoreArchive(getDbHandle(), file, {
      onProgress: (step, table, rows) => process.stdout.write(`\r${step === "check" ? "Checking" : "Restoring"} ${table}: ${rows} rows`.padEnd(60)),
    });
    process.stdout.write("\n");
    console.log(`Restored ${file}: ${Object.entries(report.rowCounts).map(([t, n]) => `${t} ${n}`).join(", ")}`);
    if (report.formatVersion < 2) console.log(`${file} is a format ${report.formatVersion} backup, which records no SHA-256 per entry: its entries were checked by CRC-32 alone.`);
    return 0;
  } catch (error) {
    if (error instanceof RestoreRefused) {
      console.error(`restore: ${error.message}`);
      return 1;
    }
    throw error;
  }
}
