/**
 * ESLint rule "lapsebank/layers": which part of the tree may import which. One table, read by the rule and
 * printed in DEVELOPERS.md. A layer is the first matching prefix of a file's path from the repository root.
 * A key ending in "*" matches every path that starts with the rest ("seed/demo-*").
 * Only imports that resolve inside the repository are checked (relative and "@/" paths); npm packages and
 * Node built-ins are the purity test's concern (test/analysis/purity.test.ts).
 */
import { dirname, relative, resolve } from "node:path";
import { fileURLToPath } from "node:url";

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), "..", "..");

/** Layer → the layers it may import (itself always allowed). `names` limits an edge to the listed exports. */
export const LAYERS = {
  "lib/analysis": [],
  "lib/stats": [],
  "lib/env": [{ layer: "lib/auth", names: ["parseTrustedProxy"], why: "LAPSEBANK_TRUSTED_PROXY is validated with the proxy rules' own parser, which imports only node:net" }],
  "lib/lint": [],
  "lib/http": [],
  "lib/db": ["lib/env"],
  "lib/auth": ["lib/db", "lib/env"],
  "lib/ingest": ["lib/analysis", "lib/db", "lib/auth", "lib/env", "seed/demo-*"],
  "lib/query": ["lib/db", "lib/auth", "lib/analysis", "lib/stats", "lib/env"],
  "lib/export": [
    "lib/db", "lib/auth", "lib/query", "lib/analysis", "lib/stats", "lib/env", "package.json",
    { layer: "lib/ingest", names: ["isStorableInstant", "launchTimeProblem"], why: "restore applies the same date rule as upload (lib/ingest/time-bounds.ts)" },
  ],
  "lib/cli": ["lib/analysis", "lib/stats", "lib/env", "lib/db", "lib/auth", "lib/ingest", "lib/query", "lib/export", "seed", "package.json"],
  // The demo generator (seed/demo-*.ts, seed/prng.ts) is pure data: lib/ingest may read the demo's names
  // from it to recognise and remove the demo; it takes only types from lib/ingest.
  "seed/demo-*": ["lib/analysis", "lib/stats", "seed/prng", { layer: "lib/ingest", names: [], why: "the generator describes layouts with the ingest types only" }],
  "seed/prng": ["lib/stats"],
  seed: ["lib/analysis", "lib/stats", "lib/db", "lib/ingest", "lib/env", "seed/demo-*", "seed/prng"],
  app: [
    "lib/query", "lib/ingest", "lib/export", "lib/auth", "lib/analysis", "lib/stats", "lib/env", "lib/http",
    { layer: "lib/db", names: ["getDb", "getDbHandle"], why: "pages and routes get the database handle and pass it on; queries live in lib/query" },
  ],
};

const ORDER = Object.keys(LAYERS).sort((a, b) => b.length - a.length);

export function layerOf(pathFromRoot) {
  const p = pathFromRoot.split("\\").join("/");
  for (const layer of ORDER) {
    if (layer.endsWith("*") ? p.startsWith(layer.slice(0, -1)) : p === layer || p.startsWith(`${layer}/`) || p.startsWith(`${layer}.`)) return layer;
  }
  return null;
}

function targetPath(fileName, specifier) {
  if (specifier.startsWith("@/")) return relative(ROOT, resolve(ROOT, specifier.slice(2)));
  if (specifier.startsWith(".")) return relative(ROOT, resolve(dirname(fileName), specifier));
  return null;
}

export const layersRule = {
  meta: {
    type: "problem",
    docs: { description: "Imports follow the one-way flow between Lapsebank's layers (lib/lint/layers-rule.mjs)" },
    schema: [],
    messages: {
      forbidden: "{{from}} may not import {{to}} ({{specifier}}). Allowed from {{from}}: {{allowed}}. See DEVELOPERS.md \"Layers\".",
      names: "{{from}} may import only {{names}} from {{to}} ({{why}}); found {{found}}.",
    },
  },
  create(context) {
    const fileName = context.filename ?? context.getFilename();
    const fromPath = relative(ROOT, fileName);
    const from = layerOf(fromPath);
    if (from === null) return {};
    const rules = LAYERS[from];

    function check(node, specifier, importedNames) {
      if (typeof specifier !== "string") return;
      const target = targetPath(fileName, specifier);
      if (target === null || target.startsWith("..")) return;
      const to = layerOf(target);
      if (to === null || to === from) return;
      const edge = rules.find((r) => (typeof r === "string" ? r : r.layer) === to);
      if (edge === undefined) {
        const allowed = rules.map((r) => (typeof r === "string" ? r : `${r.layer} (${r.names.join(", ")})`)).join(", ") || "nothing outside itself";
        context.report({ node, messageId: "forbidden", data: { from, to, specifier, allowed } });
        return;
      }
      if (typeof edge !== "string") {
        const extra = importedNames === null ? ["*"] : importedNames.filter((n) => !edge.names.includes(n));
        const names = edge.names.length > 0 ? edge.names.join(", ") : "types";
        if (extra.length > 0) context.report({ node, messageId: "names", data: { from, to, names, why: edge.why, found: extra.join(", ") } });
      }
    }

    const valueNames = (node) => {
      if (node.importKind === "type") return [];
      const names = [];
      for (const s of node.specifiers ?? []) {
        if (s.type === "ImportNamespaceSpecifier" || s.type === "ImportDefaultSpecifier") return null;
        if (s.importKind === "type") continue;
        names.push(s.imported?.name ?? s.imported?.value);
      }
      return names;
    };

    return {
      ImportDeclaration: (node) => check(node, node.source.value, valueNames(node)),
      ExportNamedDeclaration: (node) => node.source && check(node, node.source.value, node.exportKind === "type" ? [] : null),
      ExportAllDeclaration: (node) => check(node, node.source.value, node.exportKind === "type" ? [] : null),
      ImportExpression: (node) => node.source.type === "Literal" && check(node, node.source.value, null),
    };
  },
};
