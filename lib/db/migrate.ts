import { spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { isPostgresUrl } from "../env.ts";

/**
 * Applies the checked-in migrations of the engine that `url` selects (`prisma migrate deploy`).
 * Creates the folder of a SQLite file first. Throws with Prisma's own output on failure.
 */
export function applyMigrations(url: string, options: { quiet?: boolean } = {}): void {
  if (!isPostgresUrl(url)) {
    const file = url.replace(/^file:/, "").split("?")[0] ?? "";
    if (file && file !== ":memory:") fs.mkdirSync(path.dirname(path.resolve(file)), { recursive: true });
  }
  const prismaBin = path.resolve("node_modules/.bin/prisma");
  const result = spawnSync(prismaBin, ["migrate", "deploy"], {
    env: { ...process.env, DATABASE_URL: url },
    encoding: "utf8",
  });
  if (result.status !== 0) {
    throw new Error(`Could not apply migrations to ${redactUrl(url)}:\n${result.stdout}\n${result.stderr}`);
  }
  if (!options.quiet) process.stdout.write(result.stdout.split("\n").filter((l) => /migrat/i.test(l)).join("\n") + "\n");
}

/** Hides a password in a database URL before it is printed. */
export function redactUrl(url: string): string {
  return url.replace(/\/\/([^:@/]+):[^@/]+@/, "//$1:***@");
}
