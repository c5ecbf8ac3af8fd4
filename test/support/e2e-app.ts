import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { freeLoopbackPort } from "./free-port.ts";

/**
 * One more production app process (`next start` on a free loopback port) on the database at `url`, for the
 * e2e files that need their own app beside the shared one. Resolves with its base URL once /account answers.
 */
export async function startNextApp(url: string): Promise<{ base: string; server: ChildProcess }> {
  const port = await freeLoopbackPort();
  const server = spawn(path.resolve("node_modules/.bin/next"), ["start", "-H", "127.0.0.1", "-p", String(port)], {
    env: { ...process.env, DATABASE_URL: url, NODE_ENV: "production", PORT: String(port) },
    stdio: ["ignore", "pipe", "pipe"],
    detached: true,
  });
  let output = "";
  server.stdout?.on("data", (c: Buffer) => (output = (output + c.toString()).slice(-5000)));
  server.stderr?.on("data", (c: Buffer) => (output = (output + c.toString()).slice(-5000)));
  const base = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 60_000;
  while (Date.now() < deadline) {
    if (server.exitCode !== null) throw new Error(`app process exited early:\n${output}`);
    try {
      const response = await fetch(`${base}/account`, { signal: AbortSignal.timeout(5000) });
      if (response.status < 500) return { base, server };
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  server.kill();
  throw new Error(`app process did not answer within 60 s:\n${output}`);
}

/** A fresh browser context that may reach loopback only, and its first page. */
export async function loopbackContext(browser: Browser): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
  await context.route("**/*", (route) => (new URL(route.request().url()).hostname === "127.0.0.1" ? route.continue() : route.abort()));
  return { context, page: await context.newPage() };
}
