"use client";

import { useId, useState, type FormEvent } from "react";
import { useRouter } from "next/navigation";
import type { TemperatureCalibration } from "@/lib/analysis/types";
import { celsiusToKelvin, kelvinToCelsius } from "@/lib/analysis/units";
import type { CalibrationFitResult } from "@/lib/ingest/setup-more";
import { fitCalibrationPairs, saveCalibration } from "@/app/setup/actions";
import { CalibrationFitChart } from "./calibration-fit-chart";
import { CalibrationSpecFields, INPUT_UNIT_WORDS, specToValues, valuesToSpec, type SpecValues } from "./calibration-spec-fields";
import { dayOf, Field, FieldErrorList, FormMessage, numberFrom } from "./form-bits";


export interface CalibrationFormInitial {
  id?: string;
  spec: TemperatureCalibration | null;
  validFromUtc: string | null;
  validToUtc: string | null;
  method: string;
  notes: string;
  referenceReadings: Array<{ raw: number; temperatureK: number }> | null;
}

const fixed = (n: number | null, digits: number) => (n === null ? "—" : n.toFixed(digits).replace(/^-(0\.0+)$/, "$1"));

/** Significant digits for coefficients that span many orders of magnitude (Steinhart–Hart C ~ 1e-7). */
const coefficientText = (n: number) => (Math.abs(n) >= 1e-3 && Math.abs(n) < 1e6 ? String(Number(n.toPrecision(7))) : n.toExponential(6));

/**
 * A calibration of one sensor: model and coefficients, validity, method, reference readings, notes,
 * with the calibration helper (fit pairs of raw reading and reference temperature). Saving goes to
 * the re-analysis page when flights are affected.
 */
export function CalibrationForm({ sensor, initial }: { sensor: { id: string; serial: string }; initial: CalibrationFormInitial }) {
  const uid = useId();
  const router = useRouter();
  const [spec, setSpec] = useState<SpecValues>(() => specToValues(initial.spec));
  const [meta, setMeta] = useState({ validFrom: dayOf(initial.validFromUtc), validTo: dayOf(initial.validToUtc), method: initial.method, notes: initial.notes });
  const [readings, setReadings] = useState(initial.referenceReadings);
  const [pairs, setPairs] = useState<Array<{ raw: string; referenceC: string }>>(() =>
    initial.referenceReadings && initial.referenceReadings.length >= 2
      ? initial.referenceReadings.map((r) => ({ raw: String(r.raw), referenceC: String(Number(kelvinToCelsius(r.temperatureK).toFixed(3))) }))
      : [{ raw: "", referenceC: "" }, { raw: "", referenceC: "" }],
  );
  const [fitMode, setFitMode] = useState<"auto" | "correction" | "model">("auto");
  const [fit, setFit] = useState<CalibrationFitResult | null>(null);
  const [fitError, setFitError] = useState<string | null>(null);
  const [fitApplied, setFitApplied] = useState(false);
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const setMetaField = (key: keyof typeof meta) => (e: { target: { value: string } }) => setMeta((old) => ({ ...old, [key]: e.target.value }));
  const readingUnit = INPUT_UNIT_WORDS[spec.input];

  async function runFit() {
    setFitError(null);
    setFitApplied(false);
    const result = await fitCalibrationPairs({
      // The fit replaces any correction, so the template is the nominal model only.
      template: valuesToSpec(spec, { withCorrection: false }),
      points: pairs.filter((p) => p.raw.trim() !== "" || p.referenceC.trim() !== "").map((p) => ({ raw: numberFrom(p.raw), referenceC: numberFrom(p.referenceC) })),
      fit: fitMode,
    });
    if (!result.ok) {
      setFit(null);
      const details = Object.entries(result.fieldErrors).map(([k, m]) => `${k}: ${m.join("; ")}`).join(" · ");
      setFitError(details ? `${result.message} (${details})` : result.message);
      return;
    }
    setFit(result.data);
  }

  function applyFit() {
    if (!fit) return;
    setSpec(specToValues(fit.calibration));
    setReadings(fit.points.map((p) => ({ raw: p.raw, temperatureK: celsiusToKelvin(p.referenceC) })));
    setMeta((old) => ({ ...old, method: fit.method }));
    setFitApplied(true);
  }

  async function submit(event: FormEvent) {
    event.preventDefault();
    setBusy(true);
    const result = await saveCalibration({
      ...(initial.id ? { id: initial.id } : {}),
      calibration: {
        sensorId: sensor.id,
        spec: valuesToSpec(spec),
        validFromUtc: meta.validFrom ? `${meta.validFrom}T00:00:00Z` : "",
        validToUtc: meta.validTo ? `${meta.validTo}T00:00:00Z` : null,
        method: meta.method,
        ...(readings && readings.length ? { referenceReadings: readings } : {}),
        notes: meta.notes,
      },
    });
    setBusy(false);
    if (!result.ok) { setErrors(result.fieldErrors); setMessage(result.message); return; }
    setErrors({}); setMessage(null);
    const { id, affectedFlightCount } = result.data;
    if (affectedFlightCount > 0) {
      const reason = `calibration ${initial.id ? "corrected" : "added"} for sensor ${sensor.serial}`;
      router.push(`/setup/reprocess?calibration=${encodeURIComponent(id)}&reason=${encodeURIComponent(reason)}`);
    } else {
      router.push(`/setup/sensors/${sensor.id}?saved=calibration`);
    }
  }

  const knownKeys = new Set(["validFromUtc", "validToUtc", "method", "notes"]);
  return (
    <form onSubmit={submit} aria-label={initial.id ? "Edit calibration" : "New calibration"}>
      <section className="panel" aria-labelledby={`${uid}-model`}>
        <h2 id={`${uid}-model`}>Model and coefficients</h2>
        <CalibrationSpecFields uid={uid} values={spec} onChange={(next) => { setSpec(next); setFitApplied(false); }} errors={errors} />
      </section>

      <section className="panel" aria-labelledby={`${uid}-helper`}>
        <h2 id={`${uid}-helper`}>Calibration helper</h2>
        <p className="small muted">
          Enter two or more pairs of a raw reading (in {readingUnit}) and the reference thermometer&apos;s temperature, e.g. an ice bath and room
          temperature. Two pairs give a gain/offset correction on top of the model above; three or more refit the model by least squares.
        </p>
        <div className="table-wrap" role="region" aria-label="Reference pairs" tabIndex={0}>
          <table>
            <thead><tr><th scope="col">#</th><th scope="col">Raw reading ({readingUnit})</th><th scope="col">Reference temperature (°C)</th><th scope="col">Remove</th></tr></thead>
            <tbody>
              {pairs.map((pair, i) => (
                <tr key={i}>
                  <td>{i + 1}</td>
                  <td><input type="number" step="any" aria-label={`Raw reading ${i + 1}`} value={pair.raw} onChange={(e) => setPairs(pairs.map((p, j) => (j === i ? { ...p, raw: e.target.value } : p)))} /></td>
                  <td><input type="number" step="any" aria-label={`Reference temperature ${i + 1} (°C)`} value={pair.referenceC} onChange={(e) => setPairs(pairs.map((p, j) => (j === i ? { ...p, referenceC: e.target.value } : p)))} /></td>
                  <td>{pairs.length > 2 && <button type="button" className="button-secondary" onClick={() => setPairs(pairs.filter((_, j) => j !== i))}>Remove</button>}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        <div className="actions">
          <button type="button" className="button-secondary" onClick={() => setPairs([...pairs, { raw: "", referenceC: "" }])}>Add a pair</button>
          <label className="small">
            Fit{" "}
            <select value={fitMode} onChange={(e) => setFitMode(e.target.value as typeof fitMode)} aria-label="What to fit">
              <option value="auto">automatic (2 pairs: correction; 3+: model)</option>
              <option value="correction">gain/offset correction on the model</option>
              <option value="model">the model&apos;s own coefficients (3+ pairs)</option>
            </select>
          </label>
          <button type="button" onClick={runFit}>Fit</button>
        </div>
        {fitError && <p className="notice notice-error" role="alert">{fitError}</p>}
        {fit && (
          <div aria-label="Fit result" role="group">
            <h3>Fit: {fit.fitted === "correction" ? "gain/offset correction" : "model coefficients"} ({fit.method})</h3>
            <div className="table-wrap" role="region" aria-label="Fitted coefficients" tabIndex={0}>
              <table>
                <thead><tr><th scope="col">Coefficient</th><th scope="col" className="num">Value</th><th scope="col">Unit</th></tr></thead>
                <tbody>
                  {fit.coefficients.map((c) => <tr key={c.name}><td>{c.name}</td><td className="num">{coefficientText(c.value)}</td><td>{c.unit || "—"}</td></tr>)}
                </tbody>
              </table>
            </div>
            <div className="table-wrap" role="region" aria-label="Residuals" tabIndex={0}>
              <table>
                <caption>Residual = fitted − reference. RMS {fixed(fit.rmsResidualK, 3)} K.</caption>
                <thead><tr><th scope="col" className="num">Reading ({readingUnit})</th><th scope="col" className="num">Reference (°C)</th><th scope="col" className="num">Fitted (°C)</th><th scope="col" className="num">Residual (K)</th></tr></thead>
                <tbody>
                  {fit.points.map((p, i) => (
                    <tr key={i}><td className="num">{p.raw}</td><td className="num">{fixed(p.referenceC, 2)}</td><td className="num">{fixed(p.fittedC, 3)}</td><td className="num">{fixed(p.residualK, 3)}</td></tr>
                  ))}
                </tbody>
              </table>
            </div>
            <CalibrationFitChart points={fit.points} curve={fit.curve} readingUnit={readingUnit} />
            <div className="actions">
              <button type="button" onClick={applyFit} disabled={fitApplied}>{fitApplied ? "Fit applied to the form" : "Use this fit"}</button>
              <span className="small muted">Copies the coefficients above into the calibration and records the pairs as its reference readings.</span>
            </div>
          </div>
        )}
      </section>

      <section className="panel" aria-labelledby={`${uid}-validity`}>
        <h2 id={`${uid}-validity`}>Validity and method</h2>
        <div className="form-grid">
          <Field id={`${uid}-from`} label="Valid from (UTC date)" error={errors.validFromUtc}><input id={`${uid}-from`} type="date" value={meta.validFrom} onChange={setMetaField("validFrom")} /></Field>
          <Field id={`${uid}-to`} label="Valid to (UTC date, optional)" hint="empty: still valid" error={errors.validToUtc}><input id={`${uid}-to`} type="date" value={meta.validTo} onChange={setMetaField("validTo")} /></Field>
          <Field id={`${uid}-method`} label="Method" hint="e.g. datasheet, two-point, least-squares" error={errors.method}><input id={`${uid}-method`} type="text" value={meta.method} onChange={setMetaField("method")} /></Field>
          <Field id={`${uid}-notes`} label="Notes" wide error={errors.notes}><textarea id={`${uid}-notes`} value={meta.notes} onChange={setMetaField("notes")} /></Field>
        </div>
        {readings && readings.length > 0 && (
          <p className="small muted">Reference readings stored with it: {readings.map((r) => `${r.raw} ${readingUnit} → ${kelvinToCelsius(r.temperatureK).toFixed(2)} °C`).join("; ")}</p>
        )}
      </section>

      <FormMessage error={message} />
      <FieldErrorList errors={Object.fromEntries(Object.entries(errors).filter(([k]) => !knownKeys.has(k) && !k.startsWith("spec.")))} />
      <p className="actions">
        <button type="submit" disabled={busy}>{busy ? "Saving…" : initial.id ? "Save calibration" : "Create calibration"}</button>
        <span className="small muted">Flights analysed with this calibration are listed for re-analysis after saving.</span>
      </p>
    </form>
  );
}
