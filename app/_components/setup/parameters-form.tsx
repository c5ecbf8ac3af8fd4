"use client";

import { useId, useState, type FormEvent } from "react";
import { useRouter } from "next/navigation";
import type { AnalysisParameters } from "@/lib/analysis/types";
import { saveProgramParameters } from "@/app/setup/actions";
import { Field, FieldErrorList, FormMessage, numberFrom } from "./form-bits";

type NumberKey = Exclude<keyof AnalysisParameters, "lagCorrection" | "fixedBandsM">;

const NUMBER_FIELDS: Array<{ key: NumberKey; label: string; hint: string }> = [
  { key: "binSizeM", label: "Bin size (m)", hint: "altitude step of the binned profile, 10–2000" },
  { key: "tropopauseSearchFloorM", label: "Tropopause search floor (m)", hint: "the lapse-rate tropopause is searched above this altitude" },
  { key: "smoothingWindowS", label: "Smoothing window (s)", hint: "moving average before differentiating for the lag correction" },
  { key: "hampelWindowSamples", label: "Spike filter half-window (samples)", hint: "Hampel filter, 1–100" },
  { key: "hampelThresholdSigmas", label: "Spike filter threshold (robust σ)", hint: "1–20" },
  { key: "maxVerticalSpeedMPerS", label: "Largest plausible vertical speed (m/s)", hint: "larger GPS altitude jumps are removed" },
  { key: "inversionMergeGapM", label: "Inversion merge gap (m)", hint: "inversions closer than this are merged" },
  { key: "inversionMinStrengthK", label: "Smallest inversion strength (K)", hint: "weaker inversions are treated as noise" },
];

const bandsText = (bands: AnalysisParameters["fixedBandsM"]) => bands.map((b) => `${b.baseM}-${b.topM} ${b.reference}`).join(", ");

/** "0-2000 agl" → { baseM: 0, topM: 2000, reference: "agl" }; a missing reference is left to the schema (msl). */
function parseBand(text: string): { baseM: number; topM: number; reference?: string } {
  const match = /^(.*?\d)\s*([a-z]+)$/i.exec(text);
  const limits = match ? (match[1] ?? "") : text;
  const [baseM, topM] = limits.split(/\s*(?:-|–|to)\s*/).map(numberFrom);
  return { baseM: baseM ?? Number.NaN, topM: topM ?? Number.NaN, ...(match ? { reference: (match[2] ?? "").toLowerCase() } : {}) };
}

/** The program's analysis parameters; every run records the values it used. */
export function ParametersForm({ initial, defaults }: { initial: AnalysisParameters; defaults: AnalysisParameters }) {
  const uid = useId();
  const router = useRouter();
  const toText = (p: AnalysisParameters) => ({
    ...Object.fromEntries(NUMBER_FIELDS.map((f) => [f.key, String(p[f.key])])) as Record<NumberKey, string>,
    lagEnabled: p.lagCorrection.enabled,
    lagTimeConstantS: String(p.lagCorrection.timeConstantS),
    bands: bandsText(p.fixedBandsM),
  });
  const [v, setV] = useState(() => toText(initial));
  const [errors, setErrors] = useState<Record<string, string[]>>({});
  const [message, setMessage] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);

  async function submit(event: FormEvent) {
    event.preventDefault();
    setBusy(true);
    const bands = v.bands.split(/[,;\n]+/).map((s) => s.trim()).filter(Boolean).map(parseBand);
    const result = await saveProgramParameters({
      ...Object.fromEntries(NUMBER_FIELDS.map((f) => [f.key, numberFrom(v[f.key])])),
      lagCorrection: { enabled: v.lagEnabled, timeConstantS: numberFrom(v.lagTimeConstantS) },
      fixedBandsM: bands,
    });
    setBusy(false);
    if (!result.ok) { setErrors(result.fieldErrors); setMessage(result.message); return; }
    setErrors({}); setMessage(null);
    if (result.data.affectedFlightCount > 0) router.push(`/setup/reprocess?all=1&reason=${encodeURIComponent("analysis parameters changed")}`);
    else router.refresh();
  }

  return (
    <form onSubmit={submit} aria-label="Analysis parameters">
      <div className="form-grid">
        {NUMBER_FIELDS.map((f) => (
          <Field key={f.key} id={`${uid}-${f.key}`} label={f.label} hint={`${f.hint}; default ${defaults[f.key]}`} error={errors[f.key]}>
            <input id={`${uid}-${f.key}`} type="number" step="any" value={v[f.key]} onChange={(e) => setV({ ...v, [f.key]: e.target.value })} />
          </Field>
        ))}
        <div className="field">
          <span className="label">Lag correction</span>
          <label><input type="checkbox" checked={v.lagEnabled} onChange={(e) => setV({ ...v, lagEnabled: e.target.checked })} /> Correct first-order sensor lag</label>
        </div>
        <Field id={`${uid}-tau`} label="Lag time constant (s)" hint="used when the lag correction is on, 0–120" error={errors["lagCorrection.timeConstantS"]}>
          <input id={`${uid}-tau`} type="number" step="any" value={v.lagTimeConstantS} onChange={(e) => setV({ ...v, lagTimeConstantS: e.target.value })} />
        </Field>
        <Field id={`${uid}-bands`} label="Fixed altitude bands (m)" wide hint={`base-top pairs with their reference, separated by commas: agl (above the site's ground) or msl (above mean sea level; the default when left out); default ${bandsText(defaults.fixedBandsM)}`} error={Object.entries(errors).filter(([k]) => k.startsWith("fixedBandsM")).flatMap(([, m]) => m)}>
          <input id={`${uid}-bands`} type="text" value={v.bands} onChange={(e) => setV({ ...v, bands: e.target.value })} />
        </Field>
      </div>
      <FormMessage error={message} />
      <FieldErrorList errors={Object.fromEntries(Object.entries(errors).filter(([k]) => !(k in v) && !k.startsWith("fixedBandsM") && k !== "lagCorrection.timeConstantS"))} />
      <p className="actions">
        <button type="submit" disabled={busy}>{busy ? "Saving…" : "Save parameters"}</button>
        <button type="button" className="button-secondary" onClick={() => setV(toText(defaults))}>Fill in the defaults</button>
      </p>
    </form>
  );
}
