#!/usr/bin/env node
// Generates both Prisma clients (SQLite and PostgreSQL) after syncing the PostgreSQL schema copy.
// Runs on `npm install` (postinstall) and before `next build`.
import { spawnSync } from "node:child_process";
import { fileURLToPath } from "node:url";

const root = fileURLToPath(new URL("..", import.meta.url));
const run = (cmd, args, env = {}) => {
  const r = spawnSync(cmd, args, { cwd: root, stdio: ["ignore", "ignore", "inherit"], env: { ...process.env, ...env } });
  if (r.status !== 0) process.exit(r.status ?? 1);
};
run(process.execPath, ["prisma/sync-schemas.mjs"]);
run("node_modules/.bin/prisma", ["generate"], { DATABASE_URL: "file:./data/lapsebank.db" });
run("node_modules/.bin/prisma", ["generate"], { DATABASE_URL: "postgresql://localhost/lapsebank" });
