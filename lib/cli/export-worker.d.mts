/** Runs `export <args>` in a heap-capped worker thread; resolves to the command's exit code (export-worker.mjs). */
export function runExportInWorker(args: string[]): Promise<number>;
