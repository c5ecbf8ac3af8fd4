import { execFileSync } from "node:child_process";

/**
 * Integration tests run on SQLite and PostgreSQL. When LAPSEBANK_TEST_POSTGRES_URL is not given,
 * start a throw-away PostgreSQL cluster on 127.0.0.1 (test/support/postgres.sh) and stop it after.
 * LAPSEBANK_SKIP_POSTGRES=1 runs the SQLite half only (say so loudly).
 */
export default function setup(): (() => void) | undefined {
  if (process.env.LAPSEBANK_TEST_POSTGRES_URL) return undefined;
  if (process.env.LAPSEBANK_SKIP_POSTGRES === "1") {
    console.warn("\n*** LAPSEBANK_SKIP_POSTGRES=1: integration tests run on SQLite only ***\n");
    return undefined;
  }
  const dir = "/tmp/lapsebank-test-pg";
  const url = execFileSync("bash", ["test/support/postgres.sh", "start", dir, "5439"], { encoding: "utf8" }).trim().split("\n").pop() ?? "";
  process.env.LAPSEBANK_TEST_POSTGRES_URL = url.replace(/\/lapsebank$/, "/postgres");
  return () => {
    execFileSync("bash", ["test/support/postgres.sh", "stop", dir]);
  };
}
