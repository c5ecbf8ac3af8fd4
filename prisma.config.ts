import { fileURLToPath } from "node:url";
import { defineConfig } from "prisma/config";

// Prisma's native schema engine is downloaded from a host these machines can't reach; a small
// Node stand-in forwards the CLI's calls to the wasm build of the same engine (see DEVELOPERS.md).
if (!process.env.PRISMA_NATIVE_SCHEMA_ENGINE) {
  process.env.PRISMA_SCHEMA_ENGINE_BINARY ??= fileURLToPath(new URL("./prisma/schema-engine-wasm.mjs", import.meta.url));
}

// DATABASE_URL picks the engine: file:… → SQLite (default), postgres://… → PostgreSQL.
// Each engine has its own schema copy and migration history.
const url = process.env.DATABASE_URL ?? "file:./data/lapsebank.db";
const isPostgres = /^postgres(ql)?:/.test(url);

export default defineConfig({
  schema: isPostgres ? "prisma/postgres/schema.prisma" : "prisma/schema.prisma",
  migrations: { path: isPostgres ? "prisma/postgres/migrations" : "prisma/migrations" },
  datasource: { url },
});
