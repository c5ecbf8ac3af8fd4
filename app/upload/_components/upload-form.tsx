"use client";

import Link from "next/link";
import { DateTime } from "luxon";
import { useRouter } from "next/navigation";
import { useEffect, useId, useMemo, useRef, useState, type FormEvent } from "react";
import type { UploadChoices } from "@/lib/query/setup";
import type { LoggerLayoutSpec } from "@/lib/ingest/layout";
import type { IngestIssue } from "@/lib/ingest/errors";
import { IssueList } from "@/app/_components/issue-list";
import { previewLoggerFile, uploadFlightFile, type PreviewResult, type UploadedFlight } from "../actions";
import { LayoutEditor } from "./layout-editor";
import { PayloadEditor, SiteEditor } from "./site-payload-editors";
import { SensorEditor } from "./sensor-editor";
import { PreviewPanel } from "./preview-panel";

type Site = UploadChoices["sites"][number];
type Layout = UploadChoices["layouts"][number];
type Payload = UploadChoices["payloads"][number];
type Sensor = UploadChoices["sensors"][number];

type FileStatus =
  | { state: "queued" }
  | { state: "uploading" }
  | { state: "done"; result: UploadedFlight }
  | { state: "failed"; message: string; issues: IngestIssue[]; existingFlightId: string | null };

interface StatusRow {
  key: string;
  name: string;
  status: FileStatus;
}

type Editor = null | "layout" | "site" | "payload" | "sensor";

/** Adds or replaces records by id (a sensor comes back with its new calibration). */
function mergeById<T extends { id: string }>(base: readonly T[], added: readonly T[]): T[] {
  return [...base.filter((b) => !added.some((a) => a.id === b.id)), ...added];
}

function layoutTemperatureUnit(layout: Layout | undefined): string | null {
  const spec = layout?.spec as LoggerLayoutSpec | undefined;
  return spec?.columns?.temperature?.unit ?? null;
}

/**
 * "2025-07-14T06:30" from a datetime-local input, read as a wall-clock time in `zone`, as ISO 8601 with its offset
 * (what the upload schema asks for); "" when empty or not a time.
 */
function instantFromLocalInput(value: string, zone: string): string {
  if (!value) return "";
  const local = DateTime.fromISO(value, { zone });
  return local.isValid ? (local.toISO({ suppressMilliseconds: true }) ?? "") : "";
}

/** The zone a layout's clock keeps, for typing the launch time in the same zone; null for elapsed seconds or UTC. */
function layoutClockZone(layout: Layout | undefined, site: Site | undefined): string | null {
  const time = (layout?.spec as LoggerLayoutSpec | undefined)?.columns?.time;
  if (!time || time.format === "elapsed-seconds" || !time.clockZone || time.clockZone === "utc") return null;
  return time.clockZone === "site" ? (site?.timeZone ?? null) : time.clockZone;
}

function formatKm(m: number | null): string {
  return m === null ? "—" : `${(m / 1000).toFixed(2)} km`;
}

export function UploadForm({ choices, maxUploadMb }: { choices: UploadChoices; maxUploadMb: number }) {
  const router = useRouter();
  const uid = useId();
  const [created, setCreated] = useState<{ sites: Site[]; layouts: Layout[]; payloads: Payload[]; sensors: Sensor[] }>({ sites: [], layouts: [], payloads: [], sensors: [] });
  const allSites = useMemo(() => mergeById(choices.sites, created.sites), [choices.sites, created.sites]);
  const allLayouts = useMemo(() => mergeById(choices.layouts, created.layouts), [choices.layouts, created.layouts]);
  const allPayloads = useMemo(() => mergeById(choices.payloads, created.payloads), [choices.payloads, created.payloads]);
  const allSensors = useMemo(() => mergeById(choices.sensors, created.sensors), [choices.sensors, created.sensors]);

  const [schoolId, setSchoolId] = useState(choices.schools[0]?.id ?? "");
  const sites = allSites.filter((s) => s.schoolId === schoolId);
  const layouts = allLayouts.filter((l) => l.schoolId === schoolId);
  const payloads = allPayloads.filter((p) => p.schoolId === schoolId);
  const sensors = allSensors.filter((s) => s.schoolId === schoolId);

  const [siteId, setSiteId] = useState(sites[0]?.id ?? "");
  const [layoutId, setLayoutId] = useState(layouts[0]?.id ?? "");
  const [payloadId, setPayloadId] = useState("");
  const [sensorId, setSensorId] = useState("");
  const [calibrationId, setCalibrationId] = useState("");
  const [launchAt, setLaunchAt] = useState("");
  /** The zone the launch time is typed in, once the user picks one; until then the logger clock's zone, else UTC. */
  const [launchZoneChoice, setLaunchZoneChoice] = useState<string | null>(null);
  const [visibility, setVisibility] = useState<"school" | "program" | "public">("program");
  const [mode, setMode] = useState<"strict" | "lenient">("strict");
  const [title, setTitle] = useState("");
  const [notes, setNotes] = useState("");
  const [files, setFiles] = useState<File[]>([]);
  const [previewIndex, setPreviewIndex] = useState(0);
  const [preview, setPreview] = useState<{ loading: boolean; result: PreviewResult | null; error: string | null }>({ loading: false, result: null, error: null });
  const [editor, setEditor] = useState<Editor>(null);
  const [layoutDraft, setLayoutDraft] = useState<LoggerLayoutSpec | null>(null);
  const [formErrors, setFormErrors] = useState<string[]>([]);
  const [statuses, setStatuses] = useState<StatusRow[]>([]);
  const [busy, setBusy] = useState(false);
  const statusRef = useRef<HTMLDivElement>(null);
  const errorRef = useRef<HTMLDivElement>(null);
  const previewRequest = useRef(0);

  const selectedLayout = allLayouts.find((l) => l.id === layoutId);
  const selectedSite = allSites.find((s) => s.id === siteId);
  const clockZone = layoutClockZone(selectedLayout, selectedSite);
  const launchZoneOptions = [...new Set(["UTC", ...(selectedSite ? [selectedSite.timeZone] : []), ...(clockZone ? [clockZone] : [])])];
  const launchZone = launchZoneChoice && launchZoneOptions.includes(launchZoneChoice) ? launchZoneChoice : (clockZone ?? "UTC");
  const launchInstant = instantFromLocalInput(launchAt, launchZone);
  const selectedSensor = allSensors.find((s) => s.id === sensorId);
  const previewFile = files[previewIndex] ?? files[0] ?? null;

  function changeSchool(id: string) {
    setSchoolId(id);
    setSiteId(allSites.find((s) => s.schoolId === id)?.id ?? "");
    setLayoutId(allLayouts.find((l) => l.schoolId === id)?.id ?? "");
    setPayloadId("");
    setSensorId("");
    setCalibrationId("");
    setEditor(null);
  }

  // Preview the chosen file with the chosen layout whenever either (or the launch date) changes.
  useEffect(() => {
    if (!previewFile) {
      setPreview({ loading: false, result: null, error: null });
      return;
    }
    const request = ++previewRequest.current;
    setPreview((p) => ({ ...p, loading: true, error: null }));
    const form = new FormData();
    form.append("file", new File([previewFile.slice(0, 64 * 1024)], previewFile.name));
    form.append("truncated", previewFile.size > 64 * 1024 ? "1" : "0");
    form.append("layoutId", layoutId);
    form.append("launchAtUtc", launchInstant);
    previewLoggerFile(form)
      .then((result) => {
        if (request !== previewRequest.current) return;
        if (result.ok) setPreview({ loading: false, result: result.data, error: null });
        else setPreview({ loading: false, result: null, error: result.message });
      })
      .catch((error: unknown) => {
        if (request !== previewRequest.current) return;
        setPreview({ loading: false, result: null, error: error instanceof Error ? error.message : "The preview failed" });
      });
  }, [previewFile, layoutId, launchInstant]);

  function openLayoutEditor(spec: LoggerLayoutSpec | null) {
    setLayoutDraft(spec ?? preview.result?.suggestion?.spec ?? null);
    setEditor("layout");
  }

  function validate(): string[] {
    const errors: string[] = [];
    if (!schoolId) errors.push("Choose a school.");
    if (!siteId) errors.push("Choose a launch site (or create one).");
    if (!layoutId) errors.push("Choose a logger layout (or create one from the preview's suggestion).");
    if (files.length === 0) errors.push("Choose at least one logger file.");
    return errors;
  }

  async function onSubmit(event: FormEvent<HTMLFormElement>) {
    event.preventDefault();
    const errors = validate();
    setFormErrors(errors);
    if (errors.length) {
      requestAnimationFrame(() => errorRef.current?.focus());
      return;
    }
    setBusy(true);
    const batch = files.map((f, i) => ({ key: `${i}-${f.name}-${f.size}`, name: f.name, status: { state: "queued" } as FileStatus }));
    setStatuses(batch);
    requestAnimationFrame(() => statusRef.current?.focus());
    const update = (index: number, status: FileStatus) => setStatuses((rows) => rows.map((r, i) => (i === index ? { ...r, status } : r)));
    let lastDone: UploadedFlight | null = null;
    for (const [index, file] of files.entries()) {
      update(index, { state: "uploading" });
      if (file.size > maxUploadMb * 1024 * 1024) {
        update(index, { state: "failed", message: `The file is ${(file.size / 1048576).toFixed(1)} MB; the upload limit is ${maxUploadMb} MB.`, issues: [], existingFlightId: null });
        continue;
      }
      const form = new FormData();
      form.append("file", file);
      form.append("schoolId", schoolId);
      form.append("siteId", siteId);
      form.append("layoutId", layoutId);
      form.append("payloadId", payloadId);
      form.append("sensorId", sensorId);
      form.append("calibrationId", sensorId ? calibrationId : "");
      form.append("launchAtUtc", launchInstant);
      form.append("visibility", visibility);
      form.append("mode", mode);
      if (files.length === 1 && title.trim()) form.append("title", title.trim());
      if (notes.trim()) form.append("notes", notes);
      try {
        const result = await uploadFlightFile(form);
        if (result.ok) {
          lastDone = result.data;
          update(index, { state: "done", result: result.data });
        } else {
          update(index, { state: "failed", message: result.message, issues: result.issues ?? [], existingFlightId: result.existingFlightId ?? null });
        }
      } catch (error) {
        update(index, {
          state: "failed",
          message: `The upload did not complete (${error instanceof Error ? error.message : "network or server error"}).`,
          issues: [],
          existingFlightId: null,
        });
      }
    }
    setBusy(false);
    if (files.length === 1 && lastDone) router.push(lastDone.url);
  }

  const ids = {
    school: `${uid}-school`, site: `${uid}-site`, layout: `${uid}-layout`, payload: `${uid}-payload`, sensor: `${uid}-sensor`,
    calibration: `${uid}-calibration`, launch: `${uid}-launch`, title: `${uid}-title`, notes: `${uid}-notes`, files: `${uid}-files`,
    launchHint: `${uid}-launch-hint`, launchZone: `${uid}-launch-zone`, previewFile: `${uid}-preview-file`,
  };
  const temperatureUnit = layoutTemperatureUnit(selectedLayout);
  const rawTemperature = temperatureUnit === "counts" || temperatureUnit === "V" || temperatureUnit === "mV";

  return (
    <div className="upload-layout">
      <form onSubmit={onSubmit} noValidate aria-describedby={formErrors.length ? `${uid}-errors` : undefined}>
        {formErrors.length > 0 && (
          <div id={`${uid}-errors`} className="notice notice-error" role="alert" tabIndex={-1} ref={errorRef}>
            Before uploading:
            <ul>{formErrors.map((e) => <li key={e}>{e}</li>)}</ul>
          </div>
        )}
        <div className="panel">
          <h2>Where and with what</h2>
          <div className="form-grid">
            <div className="field">
              <label htmlFor={ids.school}>School</label>
              <select id={ids.school} value={schoolId} onChange={(e) => changeSchool(e.target.value)} required>
                {choices.schools.map((s) => <option key={s.id} value={s.id}>{s.name}</option>)}
              </select>
            </div>
            <div className="field">
              <label htmlFor={ids.site}>Launch site</label>
              <select id={ids.site} value={siteId} onChange={(e) => setSiteId(e.target.value)} required>
                {sites.length === 0 && <option value="">No sites yet</option>}
                {sites.map((s) => <option key={s.id} value={s.id}>{s.name} ({s.timeZone})</option>)}
              </select>
              <button type="button" className="button-secondary" onClick={() => setEditor(editor === "site" ? null : "site")} aria-expanded={editor === "site"}>New site…</button>
            </div>
            <div className="field">
              <label htmlFor={ids.layout}>Logger layout</label>
              <select id={ids.layout} value={layoutId} onChange={(e) => setLayoutId(e.target.value)} required>
                <option value="">{layouts.length ? "Choose a layout" : "No layouts yet"}</option>
                {layouts.map((l) => <option key={l.id} value={l.id}>{l.name}</option>)}
              </select>
              <button type="button" className="button-secondary" onClick={() => (editor === "layout" ? setEditor(null) : openLayoutEditor(null))} aria-expanded={editor === "layout"}>New layout…</button>
            </div>
            <div className="field">
              <label htmlFor={ids.payload}>Payload <span className="hint">(optional)</span></label>
              <select id={ids.payload} value={payloadId} onChange={(e) => setPayloadId(e.target.value)}>
                <option value="">None recorded</option>
                {payloads.map((p) => <option key={p.id} value={p.id}>{p.name}</option>)}
              </select>
              <button type="button" className="button-secondary" onClick={() => setEditor(editor === "payload" ? null : "payload")} aria-expanded={editor === "payload"}>New payload…</button>
            </div>
            <div className="field">
              <label htmlFor={ids.sensor}>Temperature sensor</label>
              <select id={ids.sensor} value={sensorId} onChange={(e) => { setSensorId(e.target.value); setCalibrationId(""); }}>
                <option value="">None (the file already holds °C, K or °F)</option>
                {sensors.map((s) => <option key={s.id} value={s.id}>{s.serial} ({s.kind})</option>)}
              </select>
              <button type="button" className="button-secondary" onClick={() => setEditor(editor === "sensor" ? null : "sensor")} aria-expanded={editor === "sensor"}>New sensor or calibration…</button>
              {rawTemperature && !sensorId && <span className="field-error">This layout reads raw {temperatureUnit}: choose a sensor with a calibration.</span>}
            </div>
            <div className="field">
              <label htmlFor={ids.calibration}>Calibration</label>
              <select id={ids.calibration} value={calibrationId} onChange={(e) => setCalibrationId(e.target.value)} disabled={!selectedSensor}>
                <option value="">Automatic: the one valid at launch time</option>
                {(selectedSensor?.calibrations ?? []).map((c) => (
                  <option key={c.id} value={c.id}>{c.method}, from {c.validFromUtc.slice(0, 10)}{c.validToUtc ? ` to ${c.validToUtc.slice(0, 10)}` : ""}</option>
                ))}
              </select>
            </div>
          </div>

          {editor === "site" && (
            <SiteEditor schoolId={schoolId} onCancel={() => setEditor(null)} onSaved={(site) => { setCreated((c) => ({ ...c, sites: [...c.sites, site] })); setSiteId(site.id); setEditor(null); }} />
          )}
          {editor === "payload" && (
            <PayloadEditor schoolId={schoolId} onCancel={() => setEditor(null)} onSaved={(payload) => { setCreated((c) => ({ ...c, payloads: [...c.payloads, payload] })); setPayloadId(payload.id); setEditor(null); }} />
          )}
          {editor === "layout" && (
            <LayoutEditor
              key={JSON.stringify(layoutDraft)}
              schoolId={schoolId}
              initialSpec={layoutDraft}
              headerNames={preview.result?.suggestion?.previewHeader ?? null}
              onCancel={() => setEditor(null)}
              onSaved={(layout) => { setCreated((c) => ({ ...c, layouts: [...c.layouts, layout] })); setLayoutId(layout.id); setEditor(null); }}
            />
          )}
          {editor === "sensor" && (
            <SensorEditor
              schoolId={schoolId}
              sensors={sensors}
              payloads={payloads}
              layoutTemperatureUnit={temperatureUnit}
              onCancel={() => setEditor(null)}
              onSaved={(sensor) => { setCreated((c) => ({ ...c, sensors: [...c.sensors.filter((s) => s.id !== sensor.id), sensor] })); setSensorId(sensor.id); setCalibrationId(""); setEditor(null); }}
            />
          )}
        </div>

        <div className="panel">
          <h2>Files</h2>
          <div className="form-grid">
            <div className="field field-wide">
              <label htmlFor={ids.files}>Logger files</label>
              <input
                id={ids.files}
                type="file"
                multiple
                accept=".csv,.txt,.tsv,.dat,.log,text/plain,text/csv"
                onChange={(e) => { setFiles(Array.from(e.target.files ?? [])); setPreviewIndex(0); setStatuses([]); }}
              />
              <span className="hint">One or many text files, up to {maxUploadMb} MB each. Several files are uploaded one after another with the same settings.</span>
            </div>
            {files.length > 1 && (
              <div className="field">
                <label htmlFor={ids.previewFile}>Preview file</label>
                <select id={ids.previewFile} value={previewIndex} onChange={(e) => setPreviewIndex(Number(e.target.value))}>
                  {files.map((f, i) => <option key={`${i}-${f.name}`} value={i}>{f.name}</option>)}
                </select>
              </div>
            )}
            <div className="field">
              <label htmlFor={ids.launch}>Launch time ({launchZone === "UTC" ? "UTC" : `local time in ${launchZone}`})</label>
              <input id={ids.launch} type="datetime-local" step={1} value={launchAt} onChange={(e) => setLaunchAt(e.target.value)} aria-describedby={ids.launchHint} />
              <select id={ids.launchZone} aria-label="Time zone of the launch time" value={launchZone} onChange={(e) => setLaunchZoneChoice(e.target.value)}>
                {launchZoneOptions.map((zone) => (
                  <option key={zone} value={zone}>
                    {zone === "UTC" ? "typed in UTC" : `typed in ${zone}${zone === selectedSite?.timeZone ? " (the site's zone)" : ""}${zone === clockZone ? " (the logger clock's zone)" : ""}`}
                  </option>
                ))}
              </select>
              <span id={ids.launchHint} className="hint">
                {launchInstant ? `Sent as ${launchInstant}. ` : ""}
                Needed when the file&apos;s time column has no date (elapsed seconds or clock times); for clock times it also dates the file,
                and a launch more than 30 minutes from what the file&apos;s clock shows is flagged on the flight. Files with full date-times give their own launch time.
              </span>
            </div>
          </div>
          {previewFile && (
            <PreviewPanel
              fileName={previewFile.name}
              loading={preview.loading}
              error={preview.error}
              result={preview.result}
              layoutName={selectedLayout?.name ?? null}
              launchTimeGiven={launchAt !== ""}
              onUseSuggestion={(spec) => openLayoutEditor(spec)}
            />
          )}
        </div>

        <div className="panel">
          <h2>Sharing and checks</h2>
          <div className="form-grid">
            <fieldset className="field">
              <legend>Visibility</legend>
              <div className="radio-row">
                {([["school", "School only"], ["program", "Whole program"], ["public", "Public"]] as const).map(([value, label]) => (
                  <label key={value}><input type="radio" name="visibility" value={value} checked={visibility === value} onChange={() => setVisibility(value)} /> {label}</label>
                ))}
              </div>
            </fieldset>
            <fieldset className="field">
              <legend>Bad rows</legend>
              <div className="radio-row">
                <label><input type="radio" name="mode" value="strict" checked={mode === "strict"} onChange={() => setMode("strict")} /> Strict: refuse the file</label>
                <label><input type="radio" name="mode" value="lenient" checked={mode === "lenient"} onChange={() => setMode("lenient")} /> Lenient: skip them and record how many</label>
              </div>
            </fieldset>
            <div className="field">
              <label htmlFor={ids.title}>Title <span className="hint">(optional)</span></label>
              <input id={ids.title} type="text" value={title} maxLength={200} onChange={(e) => setTitle(e.target.value)} disabled={files.length > 1} />
              <span className="hint">{files.length > 1 ? "Several files: each is titled by its site and launch time." : "Default: site and launch time."}</span>
            </div>
            <div className="field field-wide">
              <label htmlFor={ids.notes}>Notes <span className="hint">(optional)</span></label>
              <textarea id={ids.notes} value={notes} maxLength={5000} onChange={(e) => setNotes(e.target.value)} />
            </div>
          </div>
          <div className="actions" style={{ marginTop: "0.75rem" }}>
            <button type="submit" disabled={busy}>{busy ? "Uploading…" : files.length > 1 ? `Upload ${files.length} files` : "Upload"}</button>
          </div>
        </div>
      </form>

      {statuses.length > 0 && (
        <div className="panel" ref={statusRef} tabIndex={-1} aria-labelledby={`${uid}-status-title`}>
          <h2 id={`${uid}-status-title`}>Upload progress</h2>
          <div className="table-wrap" role="region" aria-label="Upload progress" aria-live="polite" tabIndex={0}>
            <table>
              <thead><tr><th scope="col">File</th><th scope="col">Status</th><th scope="col">Result</th></tr></thead>
              <tbody>
                {statuses.map((row) => (
                  <tr key={row.key}>
                    <td>{row.name}</td>
                    <td className={`status-${row.status.state === "done" ? "done" : row.status.state}`}>
                      {row.status.state === "queued" ? "queued" : row.status.state === "uploading" ? "uploading…" : row.status.state === "done" ? "analysed" : "failed"}
                    </td>
                    <td><StatusDetail status={row.status} /></td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </div>
      )}
    </div>
  );
}

function StatusDetail({ status }: { status: FileStatus }) {
  if (status.state === "done") {
    const r = status.result;
    return (
      <>
        Tropopause {formatKm(r.tropopauseAltitudeM)}, tropospheric lapse rate {r.troposphericLapseRateKPerKm === null ? "—" : `${r.troposphericLapseRateKPerKm.toFixed(2)} K/km`}.{" "}
        <Link href={r.url}>Open {r.title}</Link>
        {r.warnings.length > 0 && <div className="small muted">{r.warnings.length} QC note{r.warnings.length === 1 ? "" : "s"}{r.skippedRowCount ? `, ${r.skippedRowCount} rows skipped` : ""}</div>}
      </>
    );
  }
  if (status.state === "failed") {
    return (
      <>
        {status.message}
        {status.existingFlightId && <> <Link href={`/flights/${status.existingFlightId}`}>Open the existing flight</Link>.</>}
        {!status.existingFlightId && <IssueList issues={status.issues} />}
      </>
    );
  }
  return null;
}
