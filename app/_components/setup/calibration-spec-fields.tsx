"use client";

import type { TemperatureCalibration } from "@/lib/analysis/types";
import { Field, numberFrom } from "./form-bits";

/** The calibration model editor's text state; every number stays text until the spec is built. */
export interface SpecValues {
  input: TemperatureCalibration["input"];
  bits: string; referenceV: string; divisor: "2^N" | "2^N-1";
  kind: TemperatureCalibration["sensor"]["kind"];
  scaleMvPerK: string; offsetV: string;
  supplyV: string; seriesOhm: string; side: "high" | "low"; equation: "beta" | "steinhart-hart";
  beta: string; r0Ohm: string; t0K: string; a: string; b: string; c: string;
  coefficients: string;
  gain: string; offsetK: string;
}

export const INPUT_UNIT_WORDS: Record<TemperatureCalibration["input"], string> = {
  counts: "ADC counts", volts: "V", millivolts: "mV", celsius: "°C", kelvin: "K", fahrenheit: "°F",
};

const ELECTRICAL = new Set<TemperatureCalibration["input"]>(["counts", "volts", "millivolts"]);

export function specToValues(spec: TemperatureCalibration | null): SpecValues {
  const values: SpecValues = {
    input: spec?.input ?? "counts",
    bits: String(spec?.adc?.bits ?? 10), referenceV: String(spec?.adc?.referenceV ?? 5), divisor: spec?.adc?.divisor ?? "2^N",
    kind: spec?.sensor.kind ?? "linear-voltage",
    scaleMvPerK: "10", offsetV: "0",
    supplyV: "3.3", seriesOhm: "10000", side: "low", equation: "beta",
    beta: "3950", r0Ohm: "10000", t0K: "298.15", a: "", b: "", c: "",
    coefficients: "",
    gain: spec?.correction ? String(spec.correction.gain) : "",
    offsetK: spec?.correction ? String(spec.correction.offsetK) : "",
  };
  const sensor = spec?.sensor;
  if (sensor?.kind === "linear-voltage") Object.assign(values, { scaleMvPerK: String(sensor.scaleMvPerK), offsetV: String(sensor.offsetV) });
  if (sensor?.kind === "polynomial") values.coefficients = sensor.coefficients.join(", ");
  if (sensor?.kind === "thermistor-divider") {
    Object.assign(values, { supplyV: String(sensor.supplyV), seriesOhm: String(sensor.seriesOhm), side: sensor.thermistorSide, equation: sensor.equation.kind });
    if (sensor.equation.kind === "beta") Object.assign(values, { beta: String(sensor.equation.beta), r0Ohm: String(sensor.equation.r0Ohm), t0K: String(sensor.equation.t0K) });
    else Object.assign(values, { a: String(sensor.equation.a), b: String(sensor.equation.b), c: String(sensor.equation.c) });
  }
  return values;
}

/** The spec the server validates (temperatureCalibrationSchema); empty numbers become NaN and are reported there. */
export function valuesToSpec(v: SpecValues, options: { withCorrection: boolean } = { withCorrection: true }): TemperatureCalibration {
  const adc = v.input === "counts" ? { adc: { bits: numberFrom(v.bits), referenceV: numberFrom(v.referenceV), divisor: v.divisor } } : {};
  const correction = options.withCorrection && (v.gain.trim() || v.offsetK.trim())
    ? { correction: { gain: v.gain.trim() ? numberFrom(v.gain) : 1, offsetK: v.offsetK.trim() ? numberFrom(v.offsetK) : 0 } }
    : {};
  let sensor: TemperatureCalibration["sensor"];
  switch (v.kind) {
    case "linear-voltage":
      sensor = { kind: "linear-voltage", scaleMvPerK: numberFrom(v.scaleMvPerK), offsetV: numberFrom(v.offsetV) };
      break;
    case "thermistor-divider":
      sensor = {
        kind: "thermistor-divider", supplyV: numberFrom(v.supplyV), seriesOhm: numberFrom(v.seriesOhm), thermistorSide: v.side,
        equation: v.equation === "beta"
          ? { kind: "beta", beta: numberFrom(v.beta), r0Ohm: numberFrom(v.r0Ohm), t0K: numberFrom(v.t0K) }
          : { kind: "steinhart-hart", a: numberFrom(v.a), b: numberFrom(v.b), c: numberFrom(v.c) },
      };
      break;
    case "polynomial":
      sensor = { kind: "polynomial", coefficients: v.coefficients.split(/[;,\s]+/).filter(Boolean).map(numberFrom) };
      break;
    case "direct":
      sensor = { kind: "direct" };
      break;
  }
  return { input: v.input, ...adc, sensor, ...correction };
}

/** Model, reading unit, ADC and coefficients of a calibration, with the field correction last. */
export function CalibrationSpecFields({ uid, values, onChange, errors }: { uid: string; values: SpecValues; onChange: (next: SpecValues) => void; errors: Record<string, string[]> }) {
  const set = <K extends keyof SpecValues>(key: K) => (e: { target: { value: string } }) => onChange({ ...values, [key]: e.target.value as SpecValues[K] });
  const err = (path: string) => errors[`spec.${path}`];
  const num = (key: keyof SpecValues, label: string, hint?: string, path = `sensor.${String(key)}`) => (
    <Field id={`${uid}-${String(key)}`} label={label} hint={hint} error={err(path)}>
      <input id={`${uid}-${String(key)}`} type="number" step="any" value={String(values[key])} onChange={set(key)} />
    </Field>
  );
  const electrical = ELECTRICAL.has(values.input);
  return (
    <div className="form-grid">
      <Field id={`${uid}-kind`} label="Model" error={err("sensor.kind")}>
        <select id={`${uid}-kind`} value={values.kind} onChange={set("kind")}>
          <option value="linear-voltage">Linear voltage sensor (mV/K)</option>
          <option value="thermistor-divider">NTC thermistor in a voltage divider</option>
          <option value="polynomial">Polynomial T[K] = c0 + c1·x + …</option>
          <option value="direct">Column already holds a temperature</option>
        </select>
      </Field>
      <Field id={`${uid}-input`} label="Readings are in" error={err("input")}>
        <select id={`${uid}-input`} value={values.input} onChange={set("input")}>
          {(Object.keys(INPUT_UNIT_WORDS) as Array<TemperatureCalibration["input"]>).map((k) => <option key={k} value={k}>{INPUT_UNIT_WORDS[k]}</option>)}
        </select>
      </Field>
      {values.input === "counts" && (
        <>
          {num("bits", "ADC resolution (bits)", undefined, "adc.bits")}
          {num("referenceV", "ADC reference (V)", undefined, "adc.referenceV")}
          <Field id={`${uid}-divisor`} label="ADC full scale" error={err("adc.divisor")}>
            <select id={`${uid}-divisor`} value={values.divisor} onChange={set("divisor")}>
              <option value="2^N">counts ÷ 2^N</option>
              <option value="2^N-1">counts ÷ (2^N − 1)</option>
            </select>
          </Field>
        </>
      )}
      {values.kind === "linear-voltage" && (
        <>
          {num("scaleMvPerK", "Scale (mV/K)")}
          {num("offsetV", "Offset (V)", "output at 0 K")}
        </>
      )}
      {values.kind === "thermistor-divider" && (
        <>
          {num("supplyV", "Divider supply (V)")}
          {num("seriesOhm", "Fixed resistor (Ω)")}
          <Field id={`${uid}-side`} label="Thermistor position" error={err("sensor.thermistorSide")}>
            <select id={`${uid}-side`} value={values.side} onChange={set("side")}>
              <option value="high">between supply and the measured node</option>
              <option value="low">between the measured node and ground</option>
            </select>
          </Field>
          <Field id={`${uid}-eq`} label="Equation" error={err("sensor.equation.kind")}>
            <select id={`${uid}-eq`} value={values.equation} onChange={set("equation")}>
              <option value="beta">beta</option>
              <option value="steinhart-hart">Steinhart–Hart</option>
            </select>
          </Field>
          {values.equation === "beta" ? (
            <>
              {num("beta", "Beta (K)", undefined, "sensor.equation.beta")}
              {num("r0Ohm", "R0 (Ω)", undefined, "sensor.equation.r0Ohm")}
              {num("t0K", "T0 (K)", undefined, "sensor.equation.t0K")}
            </>
          ) : (
            <>
              {num("a", "A (1/K)", undefined, "sensor.equation.a")}
              {num("b", "B (1/K)", undefined, "sensor.equation.b")}
              {num("c", "C (1/K)", undefined, "sensor.equation.c")}
            </>
          )}
        </>
      )}
      {values.kind === "polynomial" && (
        <Field id={`${uid}-coef`} label="Coefficients c0, c1, c2 … (result in K)" wide error={err("sensor.coefficients")}>
          <input id={`${uid}-coef`} type="text" value={values.coefficients} onChange={set("coefficients")} placeholder="e.g. 180, 0.25" />
        </Field>
      )}
      {values.kind !== "direct" && !electrical && values.kind !== "polynomial" && (
        <p className="field field-wide field-error">This model needs readings in counts, V or mV.</p>
      )}
      {num("gain", "Field correction gain", "T′ = gain · T + offset; empty for none", "correction.gain")}
      {num("offsetK", "Field correction offset (K)", undefined, "correction.offsetK")}
    </div>
  );
}
