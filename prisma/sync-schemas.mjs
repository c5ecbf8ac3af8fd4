#!/usr/bin/env node
// Writes prisma/postgres/schema.prisma from prisma/schema.prisma (the one source of truth).
// Only the generator output and the provider differ. `--check` exits 1 when the copy has drifted.
import fs from "node:fs";
import { fileURLToPath } from "node:url";

const here = (p) => fileURLToPath(new URL(p, import.meta.url));
const source = fs.readFileSync(here("./schema.prisma"), "utf8");

export function toPostgresSchema(sqliteSchema) {
  const out = sqliteSchema
    .replace('output   = "../lib/db/generated/sqlite"', 'output   = "../../lib/db/generated/postgres"')
    .replace('provider = "sqlite"', 'provider = "postgresql"')
    .replace(
      "// prisma/postgres/schema.prisma is generated from it by prisma/sync-schemas.mjs.",
      "// GENERATED from prisma/schema.prisma by prisma/sync-schemas.mjs: do not edit.",
    );
  if (out === sqliteSchema) throw new Error("sync-schemas: nothing was replaced; has the header changed?");
  return out;
}

const target = here("./postgres/schema.prisma");
const wanted = toPostgresSchema(source);
if (process.argv.includes("--check")) {
  const current = fs.existsSync(target) ? fs.readFileSync(target, "utf8") : "";
  if (current !== wanted) {
    console.error("prisma/postgres/schema.prisma is out of date: run `node prisma/sync-schemas.mjs`");
    process.exit(1);
  }
} else {
  fs.mkdirSync(here("./postgres"), { recursive: true });
  fs.writeFileSync(target, wanted);
}
