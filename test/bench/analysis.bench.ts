/**
 * Analysis throughput on a 4-hour, 1 Hz flight (14 400 rows): full analyseFlight per flight,
 * samples per second, and, as a baseline measured in the same run, the time to copy and sort the
 * rows by time, giving the ratio of analysis cost to that floor. Target: ≥ 1 000 000 samples/s.
 */
import { analyseFlight } from "../../lib/analysis/index";
import type { FlightAnalysisInput, RawSample } from "../../lib/analysis/types";
import { KELVIN_DIRECT, SEA_LEVEL_SITE, standardAtmosphereTemperatureK, syntheticFlight } from "../support/synthetic-profiles";
import type { BenchResult } from "./types";

const FLIGHT_ROWS = 14_400;
const WARM_UP = 5;
const REPEATS = 40;

function fourHourFlight(): RawSample[] {
  const rows = syntheticFlight({
    temperatureAtAltitudeK: standardAtmosphereTemperatureK,
    topM: 33000,
    ascentRateMPerS: 4.5,
    descentRateMPerS: 5,
    preLaunchS: 60,
    postLandingS: 600,
    noiseK: 0.2,
    seed: 14400,
    withPressure: true,
    gpsSpikes: [{ index: 1000, offsetM: 3000 }, { index: 9000, offsetM: -1500 }],
  });
  return rows.slice(0, FLIGHT_ROWS);
}

function medianMs(run: () => void): number {
  for (let i = 0; i < WARM_UP; i++) run();
  const times: number[] = [];
  for (let i = 0; i < REPEATS; i++) {
    const t0 = performance.now();
    run();
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  return times[times.length >> 1] as number;
}

export async function benchAnalysis(): Promise<BenchResult[]> {
  const samples = fourHourFlight();
  const input: FlightAnalysisInput = { samples, calibration: KELVIN_DIRECT, site: SEA_LEVEL_SITE };
  const lagInput: FlightAnalysisInput = { ...input, parameters: { lagCorrection: { enabled: true, timeConstantS: 3 } } };
  let sink = 0;
  const baselineMs = medianMs(() => {
    const copy = samples.slice().sort((a, b) => a.elapsedS - b.elapsedS || a.sourceLine - b.sourceLine);
    sink += copy.length;
  });
  const analysisMs = medianMs(() => {
    sink += analyseFlight(input).levels.length;
  });
  const lagMs = medianMs(() => {
    sink += analyseFlight(lagInput).levels.length;
  });
  const check = analyseFlight(input);
  const samplesPerS = (samples.length / analysisMs) * 1000;
  return [
    { name: "analysis: flight size", value: samples.length, unit: "rows", note: `4 h at 1 Hz, burst ${Math.round(check.summary.burstAltitudeM ?? 0)} m, ${check.levels.length} levels` },
    { name: "analysis: analyseFlight per flight", value: round(analysisMs), unit: "ms", note: `median of ${REPEATS} after ${WARM_UP} warm-up runs` },
    { name: "analysis: throughput", value: Math.round(samplesPerS), unit: "samples/s", note: samplesPerS >= 1_000_000 ? "meets the ≥ 1 000 000 samples/s target" : "BELOW the 1 000 000 samples/s target" },
    { name: "analysis: with lag correction", value: round(lagMs), unit: "ms" },
    { name: "baseline: copy + sort rows by time", value: round(baselineMs), unit: "ms", note: sink > 0 ? "same run, same rows" : "" },
    { name: "analysis / baseline ratio", value: round(analysisMs / baselineMs), unit: "×" },
  ];
}

const round = (v: number): number => Math.round(v * 1000) / 1000;
