import Link from "next/link";
import { HEIGHT_REFERENCES, type HeightReference } from "@/lib/analysis/band-coverage";
import { CLIMATOLOGY_GROUPINGS, CLIMATOLOGY_METRICS, HOUR_BIN_WIDTHS, type ClimatologyGrouping, type ClimatologyMetric } from "@/lib/query/climatology-params";

interface Option {
  id: string;
  name: string;
}

export const METRIC_CHOICES: Record<ClimatologyMetric, string> = {
  "tropospheric-lapse-rate": "Tropospheric lapse rate (K/km)",
  "band-lapse-rate": "Lapse rate of an altitude band (K/km)",
  "tropopause-altitude": "First-tropopause height (km)",
  "tropopause-temperature": "First-tropopause temperature (K)",
  "surface-inversion-frequency": "Surface-inversion frequency (% of flights)",
  "surface-inversion-depth": "Surface-inversion depth (m)",
  "surface-inversion-strength": "Surface-inversion strength (K)",
  "surface-temperature": "Surface temperature (K)",
  "max-altitude": "Maximum altitude (km)",
  "surface-dew-point": "Surface dew point (K)",
  "lcl-altitude": "Lifting condensation level (km above sea level)",
  "precipitable-water": "Precipitable water (mm)",
  "freezing-level-altitude": "Freezing level, lowest (km above sea level)",
  "mixed-layer-height": "Mixed-layer height, parcel method (m above ground)",
  "mixed-layer-height-gradient": "Mixed-layer height, θ gradient (m above ground)",
};

export const BAND_REFERENCE_CHOICES: Record<HeightReference, string> = {
  agl: "Above ground level (AGL)",
  msl: "Above mean sea level (MSL)",
};

const GROUPING_CHOICES: Record<ClimatologyGrouping, string> = {
  none: "No grouping",
  season: "Season at the site (winter, spring, summer, autumn)",
  "season-code": "Season code (DJF, MAM, JJA, SON)",
  month: "Month",
  site: "Site",
  school: "School",
  year: "Year",
  "launch-hour": "Local launch hour (bins)",
  "hours-after-sunrise": "Hours after sunrise (bins)",
};

const SEASON_HINT = "A season (summer, winter: at each site's hemisphere), a code (JJA) or months (Oct-Nov, 10-11, Dec-Feb).";

const CLAIM_GROUP_HINT = `${SEASON_HINT} Or site:<id>, school:<id>, year:2024, hour:6-12 (local launch hour), sunrise:0-3 (hours after sunrise), or several joined by ";" (site:<id>; summer).`;

function FieldErrors({ errors, id }: { errors: string[] | undefined; id: string }) {
  if (!errors || errors.length === 0) return null;
  return (
    <p className="field-error" id={id} role="alert">
      {errors.join("; ")}
    </p>
  );
}

function TextField(props: { name: string; label: string; values: Record<string, string>; errors: Record<string, string[]>; hint?: string; type?: "text" | "number" | "date"; step?: string; placeholder?: string; list?: string }) {
  const id = `c-${props.name}`;
  const errors = props.errors[props.name];
  const describedBy = [props.hint ? `${id}-hint` : null, errors ? `${id}-error` : null].filter(Boolean).join(" ") || undefined;
  return (
    <div className="field">
      <label htmlFor={id}>{props.label}</label>
      <input
        id={id}
        name={props.name}
        type={props.type ?? "text"}
        step={props.step}
        placeholder={props.placeholder}
        list={props.list}
        defaultValue={props.values[props.name] ?? ""}
        aria-invalid={errors ? true : undefined}
        aria-describedby={describedBy}
      />
      {props.hint && <span className="hint" id={`${id}-hint`}>{props.hint}</span>}
      <FieldErrors errors={errors} id={`${id}-error`} />
    </div>
  );
}

function selected(values: Record<string, string>, name: string): string[] {
  return (values[name] ?? "").split(",").map((s) => s.trim()).filter((s) => s !== "");
}

/**
 * The climatology query and claim form: a plain GET form, so every choice lands in the URL and
 * the result can be bookmarked, shared and reloaded. Works without JavaScript and by keyboard.
 */
export function ClimatologyQueryForm({
  values,
  errors,
  schools,
  sites,
}: {
  values: Record<string, string>;
  errors: Record<string, string[]>;
  schools: Option[];
  sites: Array<Option & { schoolId: string }>;
}) {
  const claim = values.claim ?? "none";
  return (
    <form className="climatology-form" method="get" action="/climatology" aria-label="Climatology query">
      <datalist id="c-season-suggestions">
        {["summer", "winter", "spring", "autumn", "DJF", "MAM", "JJA", "SON", "Oct-Nov", "Dec-Feb"].map((v) => <option key={v} value={v} />)}
      </datalist>
      <fieldset>
        <legend>Which flights</legend>
        <div className="form-grid">
          <div className="field">
            <label htmlFor="c-school">Schools</label>
            <select id="c-school" name="school" multiple size={Math.min(4, Math.max(2, schools.length))} defaultValue={selected(values, "school")} aria-describedby="c-school-hint">
              {schools.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
            </select>
            <span className="hint" id="c-school-hint">None chosen means every school. Ctrl/⌘ or Shift to choose several.</span>
            <FieldErrors errors={errors.school} id="c-school-error" />
          </div>
          <div className="field">
            <label htmlFor="c-site">Sites</label>
            <select id="c-site" name="site" multiple size={Math.min(5, Math.max(2, sites.length))} defaultValue={selected(values, "site")} aria-describedby="c-site-hint">
              {sites.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
            </select>
            <span className="hint" id="c-site-hint">None chosen means every site.</span>
            <FieldErrors errors={errors.site} id="c-site-error" />
          </div>
          <TextField name="from" label="Launch date from (UTC)" type="date" values={values} errors={errors} />
          <TextField name="to" label="Launch date to (UTC, inclusive)" type="date" values={values} errors={errors} />
          <TextField name="years" label="Years" values={values} errors={errors} placeholder="2023-2025" hint="Years or ranges, e.g. 2023, 2025 or 2023-2025." />
          <TextField name="season" label="Season" values={values} errors={errors} list="c-season-suggestions" hint={SEASON_HINT} />
          <TextField name="months" label="Months" values={values} errors={errors} placeholder="Oct-Nov" hint="Any set of local months, e.g. Oct-Nov or 4,5,9." />
          <TextField name="hourFrom" label="Local launch hour from" type="number" step="0.25" values={values} errors={errors} />
          <TextField name="hourTo" label="Local launch hour to" type="number" step="0.25" values={values} errors={errors} />
          <TextField name="sunriseFrom" label="Hours after sunrise from" type="number" step="0.25" values={values} errors={errors} />
          <TextField name="sunriseTo" label="Hours after sunrise to" type="number" step="0.25" values={values} errors={errors} />
          <TextField name="elevationFrom" label="Solar elevation from (°)" type="number" step="1" values={values} errors={errors} />
          <TextField name="elevationTo" label="Solar elevation to (°)" type="number" step="1" values={values} errors={errors} />
          <TextField name="minCoverageKm" label="Minimum vertical coverage (km)" type="number" step="0.5" values={values} errors={errors} hint="Lowest to highest level of the ascent." />
          <div className="field">
            <label htmlFor="c-qc">Quality-flagged flights</label>
            <select id="c-qc" name="qc" defaultValue={values.qc ?? "exclude"}>
              <option value="exclude">Leave out flights with QC flags</option>
              <option value="include">Include them</option>
            </select>
          </div>
          <div className="field">
            <label htmlFor="c-invented">Invented (demo) flights</label>
            <select id="c-invented" name="invented" defaultValue={values.invented ?? "auto"}>
              <option value="auto">Leave out when real flights exist</option>
              <option value="include">Include them</option>
              <option value="exclude">Always leave them out</option>
            </select>
          </div>
        </div>
      </fieldset>
      <fieldset>
        <legend>What to measure</legend>
        <div className="form-grid">
          <div className="field">
            <label htmlFor="c-metric">Metric</label>
            <select id="c-metric" name="metric" defaultValue={values.metric ?? "tropospheric-lapse-rate"}>
              {CLIMATOLOGY_METRICS.map((m) => <option key={m} value={m}>{METRIC_CHOICES[m]}</option>)}
            </select>
            <FieldErrors errors={errors.metric} id="c-metric-error" />
          </div>
          <TextField name="bandBaseKm" label="Band base (km)" type="number" step="0.1" values={values} errors={errors} hint="For the band lapse rate only." />
          <TextField name="bandTopKm" label="Band top (km)" type="number" step="0.1" values={values} errors={errors} />
          <div className="field">
            <label htmlFor="c-bandReference">Band heights measured from</label>
            <select id="c-bandReference" name="bandReference" defaultValue={values.bandReference ?? "msl"} aria-describedby="c-bandReference-hint">
              {HEIGHT_REFERENCES.map((r) => <option key={r} value={r}>{BAND_REFERENCE_CHOICES[r]}</option>)}
            </select>
            <span className="hint" id="c-bandReference-hint">Above ground: each flight&apos;s own site elevation (a boundary-layer band such as 0–2 km). Above sea level: the same heights at every site (free-troposphere comparisons such as 2–7 km).</span>
            <FieldErrors errors={errors.bandReference} id="c-bandReference-error" />
          </div>
          <div className="field">
            <label htmlFor="c-phase">Profile phase</label>
            <select id="c-phase" name="phase" defaultValue={values.phase ?? "ascent"} aria-describedby="c-phase-hint">
              <option value="ascent">Ascent</option>
              <option value="descent">Descent (band lapse rate only)</option>
            </select>
            <span className="hint" id="c-phase-hint">Flight summaries describe the ascent.</span>
            <FieldErrors errors={errors.phase} id="c-phase-error" />
          </div>
          <div className="field">
            <label htmlFor="c-group">Group by</label>
            <select id="c-group" name="groupBy" defaultValue={values.groupBy ?? "season"}>
              {CLIMATOLOGY_GROUPINGS.map((g) => <option key={g} value={g}>{GROUPING_CHOICES[g]}</option>)}
            </select>
          </div>
          <div className="field">
            <label htmlFor="c-cross">Cross-table by</label>
            <select id="c-cross" name="crossBy" defaultValue={values.crossBy ?? "none"} aria-describedby={errors.crossBy ? "c-cross-error" : undefined}>
              {CLIMATOLOGY_GROUPINGS.map((g) => <option key={g} value={g}>{g === "none" ? "No cross-table" : GROUPING_CHOICES[g]}</option>)}
            </select>
            <FieldErrors errors={errors.crossBy} id="c-cross-error" />
          </div>
          <div className="field">
            <label htmlFor="c-bin">Hour bin width</label>
            <select id="c-bin" name="binHours" defaultValue={values.binHours ?? "3"}>
              {HOUR_BIN_WIDTHS.map((w) => <option key={w} value={String(w)}>{w} h</option>)}
            </select>
          </div>
          <div className="field">
            <label htmlFor="c-chartx">Scatter against</label>
            <select id="c-chartx" name="chartX" defaultValue={values.chartX ?? "day-of-year"}>
              <option value="day-of-year">Day of year</option>
              <option value="launch-hour">Local launch hour</option>
            </select>
          </div>
        </div>
      </fieldset>
      <fieldset>
        <legend>Claim check (optional)</legend>
        <div className="radio-row" role="radiogroup" aria-label="Kind of claim">
          <label><input type="radio" name="claim" value="none" defaultChecked={claim === "none"} /> No claim</label>
          <label><input type="radio" name="claim" value="one-sample" defaultChecked={claim === "one-sample"} /> The mean equals, exceeds or falls below a value</label>
          <label><input type="radio" name="claim" value="two-group" defaultChecked={claim === "two-group"} /> Group A differs from group B</label>
        </div>
        <div className="form-grid">
          <div className="field">
            <label htmlFor="c-side">Claim direction</label>
            <select id="c-side" name="claimSide" defaultValue={values.claimSide ?? "two-sided"}>
              <option value="two-sided">Mean = value / A and B differ (two-sided)</option>
              <option value="greater">Mean &gt; value / A higher than B (one-sided)</option>
              <option value="less">Mean &lt; value / A lower than B (one-sided)</option>
            </select>
          </div>
          <TextField name="claimValue" label="Stated value (in the metric's unit)" type="number" step="any" values={values} errors={errors} placeholder="6.5" />
          <TextField name="claimTolerance" label="Tolerance ± (optional; tests “equals” as equivalence)" type="number" step="any" values={values} errors={errors} placeholder="0.3" />
          <TextField name="groupA" label="Group A" values={values} errors={errors} list="c-season-suggestions" placeholder="summer" hint={CLAIM_GROUP_HINT} />
          <TextField name="groupB" label="Group B" values={values} errors={errors} list="c-season-suggestions" placeholder="Oct-Nov" />
        </div>
      </fieldset>
      <div className="actions">
        <button type="submit">Run query</button>
        <Link href="/climatology">Start over</Link>
      </div>
    </form>
  );
}
