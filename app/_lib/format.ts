/**
 * Display formatting shared by pages and API-free components. Values are stored in SI units
 * (K, m, hPa); the UI shows °C and km with the unit beside every number.
 */

import { kelvinToCelsius } from "@/lib/analysis/units";

export { kelvinToCelsius };

function fixed(value: number, digits: number): string {
  // Avoid "-0.0" for values that round to zero.
  const text = value.toFixed(digits);
  return /^-0(\.0+)?$/.test(text) ? text.slice(1) : text;
}

export function formatNumber(value: number | null | undefined, digits = 1): string {
  return value === null || value === undefined || !Number.isFinite(value) ? "—" : fixed(value, digits);
}

export function formatCelsius(temperatureK: number | null | undefined, digits = 1): string {
  return temperatureK === null || temperatureK === undefined ? "—" : `${fixed(kelvinToCelsius(temperatureK), digits)} °C`;
}

export function formatKelvin(temperatureK: number | null | undefined, digits = 1): string {
  return temperatureK === null || temperatureK === undefined ? "—" : `${fixed(temperatureK, digits)} K`;
}

export function formatKm(altitudeM: number | null | undefined, digits = 2): string {
  return altitudeM === null || altitudeM === undefined ? "—" : `${fixed(altitudeM / 1000, digits)} km`;
}

/** Kilometres without the unit, for table columns whose header carries it. */
export function formatKmValue(altitudeM: number | null | undefined, digits = 2): string {
  return altitudeM === null || altitudeM === undefined ? "—" : fixed(altitudeM / 1000, digits);
}

export function formatMetres(altitudeM: number | null | undefined): string {
  return altitudeM === null || altitudeM === undefined ? "—" : `${fixed(altitudeM, 0)} m`;
}

export function formatLapseRate(lapseRateKPerKm: number | null | undefined, stdErrKPerKm?: number | null): string {
  if (lapseRateKPerKm === null || lapseRateKPerKm === undefined) return "—";
  const se = stdErrKPerKm === null || stdErrKPerKm === undefined ? "" : ` ± ${formatStdErr(stdErrKPerKm)}`;
  return `${fixed(lapseRateKPerKm, 2)}${se} K/km`;
}

/** A standard error with enough decimals to be non-zero when it is small (0.004, 0.04, 0.4). */
export function formatStdErr(stdErr: number | null | undefined): string {
  if (stdErr === null || stdErr === undefined || !Number.isFinite(stdErr)) return "—";
  const magnitude = Math.abs(stdErr);
  const digits = magnitude === 0 || magnitude >= 0.1 ? 2 : magnitude >= 0.01 ? 3 : 4;
  return fixed(stdErr, digits);
}

/** "2025-07-14 06:30 UTC" */
export function formatUtc(iso: string): string {
  return `${iso.slice(0, 10)} ${iso.slice(11, 16)} UTC`;
}


/** Local date and time at the site, "2025-07-14 08:30". */
export function formatLocalDateTime(iso: string, timeZone: string): string {
  try {
    const parts = new Intl.DateTimeFormat("en-CA", {
      timeZone, year: "numeric", month: "2-digit", day: "2-digit", hour: "2-digit", minute: "2-digit", hourCycle: "h23",
    }).formatToParts(new Date(iso));
    const get = (type: Intl.DateTimeFormatPartTypes) => parts.find((p) => p.type === type)?.value ?? "";
    return `${get("year")}-${get("month")}-${get("day")} ${get("hour")}:${get("minute")}`;
  } catch {
    return "—";
  }
}

/** A fractional local hour (9.75) as a clock time ("09:45"). */
export function formatLocalHour(localHour: number | null | undefined): string {
  if (localHour === null || localHour === undefined || !Number.isFinite(localHour)) return "—";
  const totalMinutes = Math.round(localHour * 60) % (24 * 60);
  const hours = Math.floor(totalMinutes / 60);
  const minutes = totalMinutes % 60;
  return `${String(hours).padStart(2, "0")}:${String(minutes).padStart(2, "0")}`;
}

export function formatSeason(season: string | null | undefined, seasonName: string | null | undefined): string {
  if (!season) return "—";
  return seasonName ? `${season} (${seasonName})` : season;
}

export function formatBytes(sizeBytes: number): string {
  if (sizeBytes < 1024) return `${sizeBytes} B`;
  if (sizeBytes < 1024 * 1024) return `${fixed(sizeBytes / 1024, 1)} KB`;
  return `${fixed(sizeBytes / (1024 * 1024), 1)} MB`;
}

const STABILITY_WORDS: Record<string, string> = {
  "absolutely-stable": "absolutely stable",
  "conditionally-unstable": "conditionally unstable",
  "absolutely-unstable": "absolutely unstable",
};

export function describeStability(stability: string): string {
  return STABILITY_WORDS[stability] ?? stability.replace(/-/g, " ");
}

const LAYER_KIND_WORDS: Record<string, string> = {
  "surface-inversion": "Surface inversion",
  "elevated-inversion": "Elevated inversion",
  troposphere: "Troposphere",
  stratosphere: "Stratosphere",
  band: "Fixed band",
};

export function describeLayerKind(kind: string): string {
  return LAYER_KIND_WORDS[kind] ?? kind;
}

/**
 * A layer's name, with a band's limits as asked and their reference: "Fixed band 0–2000 m AGL (ground 1610 m MSL)".
 * Bands stored before references existed have none and read as above sea level.
 */
export function describeLayer(layer: { kind: string; bandReference: string | null; bandBaseM: number | null; bandTopM: number | null; groundElevationM: number | null }): string {
  const name = describeLayerKind(layer.kind);
  if (layer.kind !== "band" || layer.bandBaseM === null || layer.bandTopM === null) return name;
  const reference = (layer.bandReference ?? "msl").toUpperCase();
  const ground = layer.bandReference === "agl" && layer.groundElevationM !== null ? ` (ground ${fixed(layer.groundElevationM, 0)} m MSL)` : "";
  return `${name} ${fixed(layer.bandBaseM, 0)}–${fixed(layer.bandTopM, 0)} m ${reference}${ground}`;
}

const TROPOPAUSE_STATUS_WORDS: Record<string, string> = {
  found: "found",
  undetermined: "undetermined (a candidate could not be confirmed)",
  "not-found": "not found (flight too low or no 2 K/km layer)",
};

export function describeTropopauseStatus(status: string | null | undefined): string {
  if (!status) return "—";
  return TROPOPAUSE_STATUS_WORDS[status] ?? status;
}

/** Plain words for a stored calibration spec, e.g. "raw counts, 10-bit ADC (5 V, ÷2^N) → linear sensor 10 mV/K". */
export function describeCalibration(spec: unknown): string {
  if (typeof spec !== "object" || spec === null) return "—";
  const s = spec as {
    input?: string;
    adc?: { bits?: number; referenceV?: number; divisor?: string };
    sensor?: { kind?: string; scaleMvPerK?: number; offsetV?: number; supplyV?: number; seriesOhm?: number; thermistorSide?: string; equation?: { kind?: string; beta?: number; r0Ohm?: number; t0K?: number }; coefficients?: number[] };
    correction?: { gain?: number; offsetK?: number };
  };
  const parts: string[] = [];
  const inputWords: Record<string, string> = { counts: "raw counts", volts: "volts", millivolts: "millivolts", celsius: "°C", kelvin: "K", fahrenheit: "°F" };
  parts.push(inputWords[s.input ?? ""] ?? String(s.input ?? "?"));
  if (s.adc) parts.push(`${s.adc.bits}-bit ADC (${s.adc.referenceV} V reference, ÷${s.adc.divisor})`);
  const sensor = s.sensor;
  if (sensor?.kind === "linear-voltage") parts.push(`linear sensor ${sensor.scaleMvPerK} mV/K, offset ${sensor.offsetV} V`);
  else if (sensor?.kind === "thermistor-divider") {
    const eq = sensor.equation?.kind === "beta"
      ? `beta ${sensor.equation.beta} K (R0 ${sensor.equation.r0Ohm} Ω at ${sensor.equation.t0K} K)`
      : "Steinhart–Hart";
    parts.push(`thermistor divider (${sensor.supplyV} V supply, ${sensor.seriesOhm} Ω series, thermistor on the ${sensor.thermistorSide} side), ${eq}`);
  } else if (sensor?.kind === "polynomial") parts.push(`polynomial of degree ${(sensor.coefficients?.length ?? 1) - 1}`);
  else if (sensor?.kind === "direct") parts.push("read directly");
  if (s.correction) parts.push(`field correction gain ${s.correction.gain}, offset ${s.correction.offsetK} K`);
  return parts.join(" → ");
}

const SENSOR_KIND_WORDS: Record<string, string> = { "ntc-thermistor": "NTC thermistor", "linear-voltage": "linear voltage sensor" };

/** A sensor kind in words: the codes the program uses read as words; free text stays as typed. */
export function describeSensorKind(kind: string): string {
  return SENSOR_KIND_WORDS[kind] ?? kind;
}

const VISIBILITY_WORDS: Record<string, string> = { public: "public (anyone)", program: "program (members of every school)", school: "school (its own members only)" };

/** Who may see a flight, in words. */
export function describeVisibility(visibility: string): string {
  return VISIBILITY_WORDS[visibility] ?? visibility;
}
