import fs from "node:fs";

/**
 * What `npm run lapsebank` runs (the package.json script) as Node arguments, without npm itself,
 * e.g. ["lib/cli/launch.mjs"]: tests and benchmarks start the command exactly as users do.
 */
export function lapsebankNodeArgs(): string[] {
  const scripts = (JSON.parse(fs.readFileSync("package.json", "utf8")) as { scripts: Record<string, string> }).scripts;
  const words = (scripts.lapsebank ?? "").split(/\s+/).filter(Boolean);
  if (words[0] !== "node") throw new Error(`expected the lapsebank script to start with node, found "${scripts.lapsebank}"`);
  return words.slice(1);
}
