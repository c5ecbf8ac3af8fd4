/**
 * Upload memory: the peak resident memory (VmHWM from /proc/<pid>/status) of the app server, the
 * one `npm start` runs (lib/cli/app-server.mjs; SQLite, so one app process), while it
 * - refuses a 1 GB anonymous chunked upload (no Content-Length), and
 * - stores a 49 MB real upload sent by a script with an API token.
 * Between the cases the peak is reset (`5` into /proc/<pid>/clear_refs). Baseline in the same run:
 * the peak during a small real upload (under 1 MB), i.e. the server with Next, Prisma and the
 * ingest code loaded and warm. Needs a production build that matches the sources.
 */
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import http from "node:http";
import path from "node:path";
import { createApiToken, createUser } from "../../lib/auth/accounts.ts";
import { COMMA_COUNTS_LAYOUT, LINEAR_10BIT_CALIBRATION, renderLoggerFile } from "../../seed/demo-files.ts";
import { generateFlightProfile, type FlightProfileParams } from "../../seed/demo-profiles.ts";
import { setUpSchool } from "../support/flight-files.ts";
import { freeLoopbackPort } from "../support/free-port.ts";
import { createTestDatabase } from "../support/test-databases.ts";
import type { BenchResult } from "./types.ts";

const MB = 1024 * 1024;
const ANONYMOUS_BYTES = 1024 * MB;
const REAL_UPLOAD_BYTES = 49 * MB;
const BOUNDARY = "----lapsebank-bench-boundary";

function peakRssKb(pid: number): number {
  const match = /VmHWM:\s+(\d+) kB/.exec(fs.readFileSync(`/proc/${pid}/status`, "utf8"));
  return match ? Number(match[1]) : 0;
}

function currentRssKb(pid: number): number {
  const match = /VmRSS:\s+(\d+) kB/.exec(fs.readFileSync(`/proc/${pid}/status`, "utf8"));
  return match ? Number(match[1]) : 0;
}

/** Resets VmHWM to the current RSS (Linux ≥ 4.0, own processes); false when the kernel refuses. */
function resetPeak(pid: number): boolean {
  try {
    fs.writeFileSync(`/proc/${pid}/clear_refs`, "5");
    return true;
  } catch {
    return false;
  }
}

/**
 * An invented flight logged at 10 Hz (fixture data, not a real sounding), the logger left running
 * on the pad for as long as it takes to reach `targetBytes`: the kind of file that is legitimately
 * large. Rows between the 1 Hz profile samples are interpolated.
 */
function largeFlightFile(targetBytes: number): Uint8Array {
  const params: FlightProfileParams = {
    atmosphere: {
      surfaceAltitudeM: 200, surfaceTemperatureK: 290, lapseRateKPerKm: 6.5, tropopauseAltitudeM: 11_000, isothermalDepthM: 4000,
      stratosphereWarmingKPerKm: 1, surfaceInversion: null, elevatedInversion: null, surfacePressureHpa: 990, surfaceHumidityPct: 60,
      windEastMPerS: 3, windNorthMPerS: 1, jetEastMPerS: 20,
    },
    latitudeDeg: 48.1, longitudeDeg: 9.2, ascentRateMPerS: 5, burstAltitudeM: 20_000, descent: null, preLaunchS: 60, postLandingS: 0,
    sampleIntervalS: 1, sensorTimeConstantS: 1, sensorNoiseK: 0.1, gpsSpikeCount: 0, hasPressure: false, hasHumidity: false,
  };
  const samples = generateFlightProfile(params, 4242).samples;
  const flightText = renderLoggerFile(COMMA_COUNTS_LAYOUT, samples, { calibration: LINEAR_10BIT_CALIBRATION, fileStartUtcMs: Date.UTC(2024, 6, 10, 6, 0, 0) });
  const [header, ...rows] = flightText.trimEnd().split("\n");
  const parsed = rows.map((row) => row.split(",").map(Number));
  const lines: string[] = [header ?? ""];
  // Rows late in a long file are about 40 bytes (time with seven digits, newline included).
  const flightBytes = parsed.length * 10 * 40;
  const first = parsed[0] ?? [0, 200, 48.1, 9.2, 594];
  let t = 0;
  let bytes = (header ?? "").length + 1;
  const push = (alt: number, lat: number, lon: number, counts: number) => {
    const line = `${t.toFixed(1)},${alt.toFixed(1)},${lat.toFixed(6)},${lon.toFixed(6)},${Math.round(counts)}`;
    lines.push(line);
    bytes += line.length + 1;
    t += 0.1;
  };
  for (let i = 0; bytes < targetBytes - flightBytes; i++) push(first[1]! + ((i * 7919) % 11) / 10 - 0.5, first[2]!, first[3]!, first[4]!);
  for (let i = 0; i + 1 < parsed.length; i++) {
    const a = parsed[i]!;
    const b = parsed[i + 1]!;
    for (let k = 0; k < 10; k++) {
      const f = k / 10;
      push(a[1]! + (b[1]! - a[1]!) * f, a[2]! + (b[2]! - a[2]!) * f, a[3]! + (b[3]! - a[3]!) * f, a[4]! + (b[4]! - a[4]!) * f);
    }
  }
  return new TextEncoder().encode(`${lines.join("\n")}\n`);
}

function multipart(fields: Record<string, string>, file: Uint8Array, fileName: string): Buffer {
  const head = Object.entries(fields).map(([name, value]) => `--${BOUNDARY}\r\nContent-Disposition: form-data; name="${name}"\r\n\r\n${value}\r\n`).join("")
    + `--${BOUNDARY}\r\nContent-Disposition: form-data; name="file"; filename="${fileName}"\r\nContent-Type: text/csv\r\n\r\n`;
  return Buffer.concat([Buffer.from(head), file, Buffer.from(`\r\n--${BOUNDARY}--\r\n`)]);
}

/** POSTs `head` then filler up to `totalBytes` chunked (no Content-Length); stops sending once the server answers. */
function chunkedPost(url: string, head: Buffer, totalBytes: number): Promise<{ status: number; sentBytes: number }> {
  const filler = Buffer.alloc(MB, 0x31);
  return new Promise((resolve) => {
    let sent = 0;
    let answered = false;
    const request = http.request(url, { method: "POST", agent: false, headers: { "Content-Type": `multipart/form-data; boundary=${BOUNDARY}`, "Transfer-Encoding": "chunked" } });
    request.on("response", (response) => {
      answered = true;
      response.resume();
      response.on("end", () => {
        request.destroy();
        resolve({ status: response.statusCode ?? 0, sentBytes: sent });
      });
    });
    request.on("error", () => {
      if (!answered) resolve({ status: 0, sentBytes: sent });
    });
    const pump = () => {
      while (!answered && sent < totalBytes) {
        const chunk = sent === 0 ? head : filler.subarray(0, Math.min(filler.length, totalBytes - sent));
        sent += chunk.length;
        if (!request.write(chunk)) {
          request.once("drain", pump);
          return;
        }
      }
      if (!answered) request.end();
    };
    pump();
  });
}

async function post(url: string, body: Buffer, token: string): Promise<number> {
  const response = await fetch(url, { method: "POST", body: new Uint8Array(body.buffer, body.byteOffset, body.byteLength) as Uint8Array<ArrayBuffer>, headers: { "Content-Type": `multipart/form-data; boundary=${BOUNDARY}`, Authorization: `Bearer ${token}` } });
  await response.arrayBuffer();
  return response.status;
}

export async function benchUploadMemory(): Promise<BenchResult[]> {
  if (!fs.existsSync(".next/BUILD_ID")) {
    const build = spawnSync("node_modules/.bin/next", ["build"], { stdio: "inherit" });
    if (build.status !== 0) throw new Error("next build failed");
  }
  const database = await createTestDatabase("sqlite");
  const port = await freeLoopbackPort();
  const base = `http://127.0.0.1:${port}`;
  let server: ChildProcess | null = null;
  try {
    const school = await setUpSchool(database.db, "Bench Upload School");
    // An account, so the server is a shared one (not local mode) and visitors are anonymous.
    const admin = await createUser(database.db, { email: "bench-admin@example.org", password: "bench password 1", displayName: "Bench" });
    const { token } = await createApiToken(database.db, { userId: admin.id, schoolId: school.school.id, name: "bench", scopes: ["read", "upload"] });
    const fields = (launchAtUtc: string) => ({ schoolId: school.school.id, siteId: school.site.id, layoutId: school.layout.id, sensorId: school.sensor.id, launchAtUtc });
    const small = multipart(fields("2024-07-10T06:01:00Z"), largeFlightFile(300 * 1024), "small.csv");
    const big = multipart(fields("2024-07-11T06:01:00Z"), largeFlightFile(REAL_UPLOAD_BYTES), "big.csv");
    if (big.length > 50 * MB) throw new Error(`the 49 MB upload came out at ${(big.length / MB).toFixed(1)} MB`);

    server = spawn(process.execPath, [path.resolve("lib/cli/app-server.mjs")], {
      env: { ...process.env, DATABASE_URL: database.url, NODE_ENV: "production", PORT: String(port), LAPSEBANK_HOST: "127.0.0.1", LAPSEBANK_MAX_UPLOAD_MB: "50" },
      stdio: "ignore",
      detached: true,
    });
    const pid = server.pid;
    if (!pid) throw new Error("the app server did not start");
    for (let i = 0; i < 240; i++) {
      try {
        if ((await fetch(`${base}/api/v1/flights?pageSize=1`, { headers: { Authorization: `Bearer ${token}` } })).ok) break;
      } catch {
        // starting
      }
      await new Promise((r) => setTimeout(r, 250));
    }
    const canReset = resetPeak(pid);
    const startedKb = currentRssKb(pid);

    const smallStatus = await post(`${base}/api/v1/flights`, small, token);
    const baselineKb = peakRssKb(pid);

    resetPeak(pid);
    const t0 = performance.now();
    const anonymous = await chunkedPost(`${base}/api/v1/flights`, multipart(fields("2024-07-12T06:01:00Z"), new Uint8Array(0), "huge.csv").subarray(0, -`\r\n--${BOUNDARY}--\r\n`.length), ANONYMOUS_BYTES);
    const anonymousMs = performance.now() - t0;
    await new Promise((r) => setTimeout(r, 1000));
    const anonymousKb = peakRssKb(pid);

    resetPeak(pid);
    const t1 = performance.now();
    const bigStatus = await post(`${base}/api/v1/flights`, big, token);
    const bigMs = performance.now() - t1;
    const bigKb = peakRssKb(pid);

    const mb = (kb: number) => kb / 1024;
    const resetNote = canReset ? "" : " (peak could not be reset: figures are cumulative)";
    return [
      { name: "upload memory: server RSS after start (idle)", value: mb(startedKb), unit: "MB" },
      { name: `upload memory: server peak RSS, ${(small.length / MB).toFixed(1)} MB real upload (baseline)`, value: mb(baselineKb), unit: "MB", note: `HTTP ${smallStatus}${resetNote}` },
      { name: "upload memory: server peak RSS, 1 GB anonymous chunked upload", value: mb(anonymousKb), unit: "MB", note: `HTTP ${anonymous.status} after ${(anonymous.sentBytes / MB).toFixed(1)} MB sent, ${anonymousMs.toFixed(0)} ms; ${(anonymousKb / baselineKb).toFixed(2)}× baseline` },
      { name: `upload memory: server peak RSS, ${(big.length / MB).toFixed(1)} MB real upload`, value: mb(bigKb), unit: "MB", note: `HTTP ${bigStatus} in ${(bigMs / 1000).toFixed(1)} s; ${(bigKb / baselineKb).toFixed(2)}× baseline` },
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
