"use client";

import { useId, useState } from "react";
import type { UploadChoices } from "@/lib/query/setup";
import type { TemperatureCalibration } from "@/lib/analysis/types";
import { saveSensorCalibration } from "../actions";
import { FieldErrors, saveOnEnter } from "./site-payload-editors";

type Sensor = UploadChoices["sensors"][number];
type Payload = UploadChoices["payloads"][number];
type Model = "linear-adc" | "linear-voltage" | "thermistor" | "polynomial" | "direct";

const MODELS: Array<[Model, string]> = [
  ["linear-adc", "Linear sensor (e.g. 10 mV/K) read by an ADC in counts"],
  ["linear-voltage", "Linear sensor read as a voltage (V or mV)"],
  ["thermistor", "NTC thermistor in a voltage divider (Steinhart–Hart or beta)"],
  ["polynomial", "Polynomial T[K] = c0 + c1·x + c2·x² …"],
  ["direct", "Column already holds a temperature (°C, K or °F)"],
];

/** Layout temperature units in the calibration's vocabulary. */
const INPUT_OF_UNIT: Record<string, TemperatureCalibration["input"]> = { counts: "counts", V: "volts", mV: "millivolts", degC: "celsius", K: "kelvin", degF: "fahrenheit" };

const num = (text: string): number => (text.trim() === "" ? Number.NaN : Number(text));

interface Values {
  serial: string; kind: string; timeConstantS: string; payloadId: string;
  model: Model;
  linearInput: "volts" | "millivolts";
  thermistorInput: "counts" | "volts";
  polynomialInput: "counts" | "volts" | "millivolts";
  directInput: "celsius" | "kelvin" | "fahrenheit";
  bits: string; referenceV: string; divisor: "2^N" | "2^N-1";
  scaleMvPerK: string; offsetV: string;
  supplyV: string; seriesOhm: string; side: "high" | "low"; equation: "beta" | "steinhart-hart";
  beta: string; r0Ohm: string; t0K: string; a: string; b: string; c: string;
  coefficients: string;
  gain: string; offsetK: string;
  validFrom: string; validTo: string; method: string;
}

function buildCalibration(v: Values): TemperatureCalibration {
  const adc = { bits: num(v.bits), referenceV: num(v.referenceV), divisor: v.divisor };
  const correction = v.gain.trim() || v.offsetK.trim() ? { correction: { gain: v.gain.trim() ? num(v.gain) : 1, offsetK: v.offsetK.trim() ? num(v.offsetK) : 0 } } : {};
  const linear = { kind: "linear-voltage" as const, scaleMvPerK: num(v.scaleMvPerK), offsetV: num(v.offsetV) };
  switch (v.model) {
    case "linear-adc":
      return { input: "counts", adc, sensor: linear, ...correction };
    case "linear-voltage":
      return { input: v.linearInput, sensor: linear, ...correction };
    case "thermistor":
      return {
        input: v.thermistorInput,
        ...(v.thermistorInput === "counts" ? { adc } : {}),
        sensor: {
          kind: "thermistor-divider", supplyV: num(v.supplyV), seriesOhm: num(v.seriesOhm), thermistorSide: v.side,
          equation: v.equation === "beta"
            ? { kind: "beta", beta: num(v.beta), r0Ohm: num(v.r0Ohm), t0K: num(v.t0K) }
            : { kind: "steinhart-hart", a: num(v.a), b: num(v.b), c: num(v.c) },
        },
        ...correction,
      };
    case "polynomial":
      return { input: v.polynomialInput, sensor: { kind: "polynomial", coefficients: v.coefficients.split(/[,;\s]+/).filter(Boolean).map(num) }, ...correction };
    case "direct":
      return { input: v.directInput, sensor: { kind: "direct" }, ...correction };
  }
}

/** Inline editor: a new sensor with its first calibration, or a further calibration for an existing sensor. */
export function SensorEditor({
  schoolId, sensors, payloads, layoutTemperatureUnit, onSaved, onCancel,
}: {
  schoolId: string;
  sensors: Sensor[];
  payloads: Payload[];
  layoutTemperatureUnit: string | null;
  onSaved: (sensor: Sensor) => void;
  onCancel: () => void;
}) {
  const uid = useId();
  const [existingId, setExistingId] = useState("");
  const [v, setV] = useState<Values>({
    serial: "", kind: "", timeConstantS: "0", payloadId: "",
    model: layoutTemperatureUnit === "counts" ? "linear-adc" : layoutTemperatureUnit === "V" || layoutTemperatureUnit === "mV" ? "linear-voltage" : layoutTemperatureUnit ? "direct" : "linear-adc",
    linearInput: layoutTemperatureUnit === "mV" ? "millivolts" : "volts",
    thermistorInput: "counts", polynomialInput: "counts",
    directInput: layoutTemperatureUnit === "K" ? "kelvin" : layoutTemperatureUnit === "degF" ? "fahrenheit" : "celsius",
    bits: "10", referenceV: "5", divisor: "2^N",
    scaleMvPerK: "10", offsetV: "0",
    supplyV: "3.3", seriesOhm: "10000", side: "high", equation: "beta",
    beta: "", r0Ohm: "10000", t0K: "298.15", a: "", b: "", c: "",
    coefficients: "",
    gain: "", offsetK: "",
    validFrom: new Date().toISOString().slice(0, 10), validTo: "", method: "manufacturer data sheet",
  });
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [saving, setSaving] = useState(false);
  const set = <K extends keyof Values>(key: K) => (e: { target: { value: string } }) => setV((old) => ({ ...old, [key]: e.target.value as Values[K] }));
  const calibration = buildCalibration(v);
  const expectedInput = layoutTemperatureUnit ? INPUT_OF_UNIT[layoutTemperatureUnit] : undefined;
  const mismatch = expectedInput !== undefined && calibration.input !== expectedInput;

  async function save() {
    setSaving(true);
    const result = await saveSensorCalibration({
      schoolId,
      ...(existingId
        ? { sensorId: existingId }
        : { sensor: { serial: v.serial, kind: v.kind || MODELS.find(([m]) => m === v.model)?.[1] || "temperature sensor", timeConstantS: num(v.timeConstantS) || 0, notes: "", ...(v.payloadId ? { payloadId: v.payloadId } : {}) } }),
      calibration: {
        spec: calibration,
        validFromUtc: `${v.validFrom}T00:00:00Z`,
        validToUtc: v.validTo ? `${v.validTo}T00:00:00Z` : null,
        method: v.method,
        notes: "",
      },
    });
    setSaving(false);
    if (result.ok) onSaved(result.data);
    else { setErrors(result.fieldErrors); setMessage(result.message); }
  }

  const field = (key: keyof Values, label: string, type: "text" | "number" | "date" = "number", hint?: string) => (
    <div className="field">
      <label htmlFor={`${uid}-${key}`}>{label}</label>
      <input id={`${uid}-${key}`} type={type} step={type === "number" ? "any" : undefined} value={String(v[key])} onChange={set(key)} />
      {hint && <span className="hint">{hint}</span>}
    </div>
  );
  const adcFields = (
    <>
      {field("bits", "ADC resolution (bits)")}
      {field("referenceV", "ADC reference (V)")}
      <div className="field">
        <label htmlFor={`${uid}-divisor`}>ADC full scale</label>
        <select id={`${uid}-divisor`} value={v.divisor} onChange={set("divisor")}>
          <option value="2^N">counts ÷ 2^N</option>
          <option value="2^N-1">counts ÷ (2^N − 1)</option>
        </select>
      </div>
    </>
  );

  return (
    <div className="inline-editor" role="group" aria-labelledby={`${uid}-t`} onKeyDown={saveOnEnter(save)}>
      <h3 id={`${uid}-t`}>Sensor and calibration</h3>
      {message && <p className="field-error">{message}</p>}
      <FieldErrors errors={errors} />
      <div className="form-grid">
        <div className="field">
          <label htmlFor={`${uid}-which`}>Sensor</label>
          <select id={`${uid}-which`} value={existingId} onChange={(e) => setExistingId(e.target.value)}>
            <option value="">A new sensor</option>
            {sensors.map((s) => <option key={s.id} value={s.id}>Add a calibration to {s.serial}</option>)}
          </select>
        </div>
        {!existingId && (
          <>
            {field("serial", "Serial number", "text")}
            {field("kind", "Kind", "text", "e.g. linear voltage sensor, 10 kΩ NTC")}
            {field("timeConstantS", "Time constant (s)", "number", "0 when unknown")}
            <div className="field">
              <label htmlFor={`${uid}-payload`}>Mounted in payload</label>
              <select id={`${uid}-payload`} value={v.payloadId} onChange={set("payloadId")}>
                <option value="">Not recorded</option>
                {payloads.map((p) => <option key={p.id} value={p.id}>{p.name}</option>)}
              </select>
            </div>
          </>
        )}
      </div>
      <h4>Calibration</h4>
      <div className="form-grid">
        <div className="field field-wide">
          <label htmlFor={`${uid}-model`}>Model</label>
          <select id={`${uid}-model`} value={v.model} onChange={set("model")}>
            {MODELS.map(([value, label]) => <option key={value} value={value}>{label}</option>)}
          </select>
        </div>
        {v.model === "linear-adc" && (
          <>
            {adcFields}
            {field("scaleMvPerK", "Sensor scale (mV/K)", "number", "10 for a 10 mV/K sensor")}
            {field("offsetV", "Sensor offset (V)", "number", "output at 0 K")}
          </>
        )}
        {v.model === "linear-voltage" && (
          <>
            <div className="field">
              <label htmlFor={`${uid}-lin`}>Column holds</label>
              <select id={`${uid}-lin`} value={v.linearInput} onChange={set("linearInput")}><option value="volts">volts</option><option value="millivolts">millivolts</option></select>
            </div>
            {field("scaleMvPerK", "Sensor scale (mV/K)")}
            {field("offsetV", "Sensor offset (V)", "number", "output at 0 K")}
          </>
        )}
        {v.model === "thermistor" && (
          <>
            <div className="field">
              <label htmlFor={`${uid}-thin`}>Column holds</label>
              <select id={`${uid}-thin`} value={v.thermistorInput} onChange={set("thermistorInput")}><option value="counts">ADC counts</option><option value="volts">volts at the divider node</option></select>
            </div>
            {v.thermistorInput === "counts" && adcFields}
            {field("supplyV", "Divider supply (V)")}
            {field("seriesOhm", "Fixed resistor (Ω)")}
            <div className="field">
              <label htmlFor={`${uid}-side`}>Thermistor position</label>
              <select id={`${uid}-side`} value={v.side} onChange={set("side")}><option value="high">between supply and the measured node</option><option value="low">between the measured node and ground</option></select>
            </div>
            <div className="field">
              <label htmlFor={`${uid}-eq`}>Equation</label>
              <select id={`${uid}-eq`} value={v.equation} onChange={set("equation")}><option value="beta">beta</option><option value="steinhart-hart">Steinhart–Hart</option></select>
            </div>
            {v.equation === "beta" ? (
              <>
                {field("beta", "Beta (K)")}
                {field("r0Ohm", "R0 (Ω)")}
                {field("t0K", "at T0 (K)")}
              </>
            ) : (
              <>
                {field("a", "A")}
                {field("b", "B")}
                {field("c", "C")}
              </>
            )}
          </>
        )}
        {v.model === "polynomial" && (
          <>
            <div className="field">
              <label htmlFor={`${uid}-pin`}>x is the column in</label>
              <select id={`${uid}-pin`} value={v.polynomialInput} onChange={set("polynomialInput")}><option value="counts">counts</option><option value="volts">volts</option><option value="millivolts">millivolts</option></select>
            </div>
            <div className="field field-wide">
              <label htmlFor={`${uid}-coef`}>Coefficients c0, c1, c2 … (result in K)</label>
              <input id={`${uid}-coef`} type="text" value={v.coefficients} onChange={set("coefficients")} placeholder="e.g. 180, 0.25" />
            </div>
          </>
        )}
        {v.model === "direct" && (
          <div className="field">
            <label htmlFor={`${uid}-din`}>Column holds</label>
            <select id={`${uid}-din`} value={v.directInput} onChange={set("directInput")}><option value="celsius">°C</option><option value="kelvin">K</option><option value="fahrenheit">°F</option></select>
          </div>
        )}
        {field("gain", "Field correction gain (optional)", "number", "T′ = gain · T + offset")}
        {field("offsetK", "Field correction offset (K, optional)")}
        {field("validFrom", "Valid from (UTC date)", "date")}
        {field("validTo", "Valid to (UTC date, optional)", "date", "empty: still valid")}
        {field("method", "Method", "text", "e.g. manufacturer data sheet, two-point ice/room")}
      </div>
      {mismatch && (
        <p className="notice notice-warn">The chosen layout reads the temperature column as {layoutTemperatureUnit}, but this calibration expects {calibration.input}. Uploads with this pair will be refused.</p>
      )}
      <div className="actions" style={{ marginTop: "0.6rem" }}>
        <button type="button" onClick={save} disabled={saving}>{saving ? "Saving…" : existingId ? "Add calibration" : "Save sensor and calibration"}</button>
        <button type="button" className="button-secondary" onClick={onCancel}>Cancel</button>
      </div>
    </div>
  );
}
