import { spawn, spawnSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import { createApiToken, createUser } from "../../lib/auth/accounts.ts";
import { loadDemoProgram } from "../../seed/load.ts";
import { makeFlightFile } from "../support/flight-files.ts";
import { createTestDatabase, type Engine } from "../support/test-databases.ts";
import type { BenchResult } from "./types.ts";
import { freeLoopbackPort } from "../support/free-port.ts";

const READERS = 50;
const UPLOADERS = Number(process.env.LAPSEBANK_LOAD_UPLOADERS ?? 5);
const SECONDS = Number(process.env.LAPSEBANK_LOAD_SECONDS ?? 60);
/** A simulated person reads (or picks the next file) before asking again: 1–3 s, uniformly [P: common load-test practice]. */
const THINK_MS = () => 1000 + Math.random() * 2000;


function percentile(sorted: number[], p: number): number {
  if (sorted.length === 0) return Number.NaN;
  return sorted[Math.min(sorted.length - 1, Math.floor((p / 100) * sorted.length))] ?? Number.NaN;
}

/**
 * 60 s of 50 simulated readers (archive, flight pages, climatology queries) and 5 uploaders
 * against a local production build on PostgreSQL (loopback only, bounded in count and time).
 * Baseline in the same run: the same request mix, one request at a time, before the load.
 */
export async function benchLoad(engines: Engine[]): Promise<BenchResult[]> {
  const engine: Engine = engines.includes("postgres") ? "postgres" : "sqlite";
  if (!fs.existsSync(".next/BUILD_ID")) {
    const build = spawnSync("node_modules/.bin/next", ["build"], { stdio: "inherit" });
    if (build.status !== 0) throw new Error("next build failed");
  }
  const database = await createTestDatabase(engine);
  const port = await freeLoopbackPort();
  const base = `http://127.0.0.1:${port}`;
  let server: ReturnType<typeof spawn> | null = null;
  try {
    await loadDemoProgram(database.db);
    // A production PostgreSQL keeps planner statistics fresh (autovacuum); the throw-away bench
    // cluster runs without autovacuum, so gather them once after loading, as autovacuum would.
    if (engine === "postgres") await database.db.$executeRawUnsafe("ANALYZE");
    const admin = await createUser(database.db, { email: "bench-admin@example.org", password: "bench password 1", displayName: "Bench" });
    // Uploads use invented layout-A files, so pick a school that has that layout and a 10 mV/K sensor.
    const layout = await database.db.loggerLayout.findFirst({ where: { name: "Comma logger, counts" } });
    if (!layout) throw new Error("the demo archive has no layout-A logger layout");
    const school = await database.db.school.findUniqueOrThrow({ where: { id: layout.schoolId }, include: { sites: true } });
    const sample = await database.db.flight.findFirst({ where: { layoutId: layout.id, sensorId: { not: null } }, orderBy: { launchAtUtc: "desc" } });
    const sensor = sample?.sensorId ? await database.db.sensor.findUnique({ where: { id: sample.sensorId } }) : null;
    const { token } = await createApiToken(database.db, { userId: admin.id, schoolId: school.id, name: "bench", scopes: ["read", "upload"] });
    const flights = (await database.db.flight.findMany({ select: { id: true }, take: 100 })).map((f) => f.id);

    // LAPSEBANK_LOAD_NODE_ARGS passes Node options to the server (e.g. "--cpu-prof --cpu-prof-dir=/tmp/p" to profile it).
    const nodeArgs = (process.env.LAPSEBANK_LOAD_NODE_ARGS ?? "").split(" ").filter(Boolean);
    // The same server `npm start` runs: on PostgreSQL, one app process per core.
    server = spawn(process.execPath, [...nodeArgs, path.resolve("lib/cli/app-server.mjs")], {
      env: { ...process.env, DATABASE_URL: database.url, NODE_ENV: "production", PORT: String(port), HOST: "127.0.0.1" },
      stdio: "ignore",
      detached: true,
    });
    for (let i = 0; i < 240; i++) {
      try {
        if ((await fetch(`${base}/api/v1/flights?pageSize=1`, { headers: { Authorization: `Bearer ${token}` } })).ok) break;
      } catch {
        // starting
      }
      await new Promise((r) => setTimeout(r, 250));
    }
    const auth = { Authorization: `Bearer ${token}` };
    const readRequests = [
      () => `${base}/flights?page=${1 + Math.floor(Math.random() * 5)}`,
      () => `${base}/flights/${flights[Math.floor(Math.random() * flights.length)]}`,
      () => `${base}/api/v1/climatology?metric=tropospheric-lapse-rate&groupBy=season`,
      () => `${base}/api/v1/climatology?metric=band-lapse-rate&bandBaseKm=1&bandTopKm=6&groupBy=site`,
      () => `${base}/api/v1/climatology?metric=tropopause-altitude&groupBy=month&claim=two-group&groupA=JJA&groupB=10-11`,
    ];
    const timeOne = async (url: string) => {
      const t0 = performance.now();
      const response = await fetch(url, { headers: auth });
      await response.arrayBuffer();
      return { ms: performance.now() - t0, ok: response.ok };
    };
    // Baseline: each kind of read, one at a time, on the idle server (after a warm-up).
    for (const make of readRequests) await timeOne(make());
    const baseline: number[] = [];
    for (let i = 0; i < 25; i++) for (const make of readRequests) baseline.push((await timeOne(make())).ms);
    baseline.sort((a, b) => a - b);

    // The upload files are made before the clock starts: synthesising them is the load generator's
    // work, and doing it during the run would delay the timing of reads in this same process.
    const uploadFiles = Array.from({ length: UPLOADERS * SECONDS }, (_, i) => makeFlightFile({ seed: 10_000 + i }));
    const latencies: number[] = [];
    const latenciesByKind = readRequests.map(() => [] as number[]);
    const uploadLatencies: number[] = [];
    let errors = 0;
    let uploads = 0;
    const deadline = Date.now() + SECONDS * 1000;
    const reader = async () => {
      while (Date.now() < deadline) {
        const kind = Math.floor(Math.random() * readRequests.length);
        const make = readRequests[kind]!;
        try {
          const r = await timeOne(make());
          latencies.push(r.ms);
          latenciesByKind[kind]!.push(r.ms);
          if (!r.ok) errors++;
        } catch {
          errors++;
        }
        await new Promise((r) => setTimeout(r, THINK_MS()));
      }
    };
    let seed = 10_000;
    const uploader = async () => {
      while (Date.now() < deadline && layout && sensor) {
        const file = uploadFiles[(seed++ - 10_000) % uploadFiles.length]!;
        const form = new FormData();
        form.set("file", new Blob([file.bytes]), `load-${seed}.csv`);
        for (const [k, v] of Object.entries({ schoolId: school.id, siteId: school.sites[0]!.id, layoutId: layout.id, sensorId: sensor.id, launchAtUtc: "2024-07-10T06:01:00Z" })) form.set(k, v);
        const t0 = performance.now();
        try {
          const response = await fetch(`${base}/api/v1/flights`, { method: "POST", body: form, headers: auth });
          await response.arrayBuffer();
          uploadLatencies.push(performance.now() - t0);
          if (response.status === 201) uploads++;
          else errors++;
        } catch {
          errors++;
        }
        await new Promise((r) => setTimeout(r, THINK_MS()));
      }
    };
    const started = performance.now();
    await Promise.all([...Array.from({ length: READERS }, reader), ...Array.from({ length: UPLOADERS }, uploader)]);
    const elapsedS = (performance.now() - started) / 1000;
    latencies.sort((a, b) => a - b);
    uploadLatencies.sort((a, b) => a - b);
    const p50 = percentile(latencies, 50);
    const p95 = percentile(latencies, 95);
    return [
      { name: `reads, 1 client, idle server (${engine}) p50 (baseline)`, value: percentile(baseline, 50), unit: "ms" },
      { name: `load ${READERS} readers (1–3 s think time) + ${UPLOADERS} uploaders (same pauses), ${SECONDS} s: requests/s`, value: (latencies.length + uploadLatencies.length) / elapsedS, unit: "req/s", note: `${uploads} uploads stored` },
      { name: "load: read latency p50", value: p50, unit: "ms", note: `${(p50 / percentile(baseline, 50)).toFixed(1)}× idle p50` },
      { name: "load: read latency p95", value: p95, unit: "ms", note: `target ≤ 500 ms; by kind (archive, flight page, 3 climatology queries): ${latenciesByKind.map((l) => percentile(l.sort((a, b) => a - b), 95).toFixed(0)).join(" / ")} ms` },
      { name: "load: upload latency p50 / p95", value: percentile(uploadLatencies, 50), unit: "ms", note: `p95 ${percentile(uploadLatencies, 95).toFixed(0)} ms` },
      { name: "load: errors", value: errors, unit: "count", note: "target 0" },
    ];
  } finally {
    if (server?.pid) {
      try {
        process.kill(-server.pid, "SIGTERM");
      } catch {
        // gone
      }
    }
    await new Promise((r) => setTimeout(r, 500));
    await database.drop();
  }
}
