/**
 * Entry of `npm run lapsebank`. `export` runs in a heap-capped worker thread (export-worker.mjs)
 * straight from here, so this thread never loads the TypeScript loader and the export's peak
 * memory stays low; every other command runs main.ts through tsx.
 */
const [command, ...args] = process.argv.slice(2);
if (command === "export") {
  const { runExportInWorker } = await import("./export-worker.mjs");
  process.exitCode = await runExportInWorker(args);
} else {
  const { register } = await import("tsx/esm/api");
  register();
  await import("./main.ts");
}
