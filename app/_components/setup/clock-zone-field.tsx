"use client";

/** The clockZone choices of a layout's time column, as the form shows them. */
type ClockZoneChoice = "utc" | "site" | "named";

function choiceOf(value: string): ClockZoneChoice {
  return value === "utc" || value === "site" ? value : "named";
}

/**
 * Which zone a logger's clock keeps (layout time column `clockZone`): UTC, the flight's site's zone, or a
 * named IANA zone. Shown for clock times and date-times; elapsed seconds have no clock.
 */
export function ClockZoneField({ id, value, onChange, error }: { id: string; value: string; onChange: (value: string) => void; error?: string[] | undefined }) {
  const choice = choiceOf(value);
  return (
    <div className="field field-wide">
      <label htmlFor={id}>The logger&apos;s clock keeps</label>
      <select id={id} value={choice} onChange={(e) => onChange(e.target.value === "named" ? "" : e.target.value)}>
        <option value="utc">UTC</option>
        <option value="site">the launch site&apos;s time zone (daylight saving included)</option>
        <option value="named">a named time zone…</option>
      </select>
      {choice === "named" && (
        <input
          id={`${id}-name`}
          type="text"
          aria-label="Clock time zone (IANA name)"
          placeholder="e.g. Europe/Berlin"
          value={value}
          onChange={(e) => onChange(e.target.value)}
        />
      )}
      <span className="hint">
        For clock times (HH:MM:SS) and date-times written without an offset. A clock that ignores daylight saving keeps a
        fixed zone: name it, e.g. Etc/GMT+6 for UTC−6 (these names reverse the sign).
      </span>
      {error && error.length > 0 && <span className="field-error">{error.join("; ")}</span>}
    </div>
  );
}
