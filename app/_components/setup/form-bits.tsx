"use client";

import type { ReactNode } from "react";

/** Per-field messages from a server action, keyed by field path. */
export function FieldErrorList({ errors }: { errors: Record<string, string[]> }) {
  const entries = Object.entries(errors);
  if (entries.length === 0) return null;
  return (
    <ul className="issue-list field-error">
      {entries.map(([key, messages]) => <li key={key}><strong>{key}</strong>: {messages.join("; ")}</li>)}
    </ul>
  );
}

/** The result line under a form: an error (announced) or a confirmation. */
export function FormMessage({ error, ok }: { error: string | null; ok?: string | null }) {
  if (error) return <p className="notice notice-error" role="alert">{error}</p>;
  if (ok) return <p className="notice notice-ok" role="status">{ok}</p>;
  return null;
}

export function Field({ id, label, hint, error, wide, children }: { id: string; label: string; hint?: string; error?: string[] | undefined; wide?: boolean; children: ReactNode }) {
  return (
    <div className={wide ? "field field-wide" : "field"}>
      <label htmlFor={id}>{label}</label>
      {children}
      {hint && <span className="hint">{hint}</span>}
      {error && error.length > 0 && <span className="field-error">{error.join("; ")}</span>}
    </div>
  );
}

/** "" → NaN so zod reports a missing number instead of silently taking 0. */
export function numberFrom(text: string): number {
  return text.trim() === "" ? Number.NaN : Number(text);
}

/** An ISO instant as the value of a date input (UTC day). */
export function dayOf(iso: string | null | undefined): string {
  return iso ? iso.slice(0, 10) : "";
}
