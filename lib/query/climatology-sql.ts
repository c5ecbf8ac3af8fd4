/**
 * A small SQL fragment builder for the climatology queries: values always travel as bound
 * parameters, written "?" while building and renumbered to $1, $2… for PostgreSQL at the end.
 * Identifiers are fixed strings from this code, never user input.
 */

export interface SqlFragment {
  readonly text: string;
  readonly values: readonly unknown[];
}

export type SqlEngine = "sqlite" | "postgres";

function isFragment(value: unknown): value is SqlFragment {
  return typeof value === "object" && value !== null && "text" in value && "values" in value && Array.isArray((value as SqlFragment).values);
}

/** Tagged template: interpolated fragments are inlined, anything else becomes a bound "?" parameter. */
export function sql(strings: TemplateStringsArray, ...values: unknown[]): SqlFragment {
  let text = strings[0] ?? "";
  const bound: unknown[] = [];
  values.forEach((value, i) => {
    if (isFragment(value)) {
      text += value.text;
      bound.push(...value.values);
    } else {
      text += "?";
      bound.push(value);
    }
    text += strings[i + 1] ?? "";
  });
  return { text, values: bound };
}

/** Literal SQL text with no parameters (identifiers and keywords chosen by this code). */
export function raw(text: string): SqlFragment {
  if (text.includes("?")) throw new Error("raw SQL text must not contain '?'");
  return { text, values: [] };
}

export function joinSql(parts: readonly SqlFragment[], separator: string): SqlFragment {
  return { text: parts.map((p) => p.text).join(separator), values: parts.flatMap((p) => p.values) };
}

/** "a AND b AND c", or TRUE for no conditions. */
export function andSql(parts: readonly SqlFragment[]): SqlFragment {
  return parts.length === 0 ? raw("TRUE") : joinSql(parts.map((p) => sql`(${p})`), " AND ");
}

/** "(?, ?, ?)" for a non-empty list of values. */
export function listSql(values: readonly unknown[]): SqlFragment {
  if (values.length === 0) throw new Error("an IN list needs at least one value");
  return { text: `(${values.map(() => "?").join(", ")})`, values: [...values] };
}

/** Final text and values for an engine: "?" placeholders become $n on PostgreSQL. */
export function forEngine(fragment: SqlFragment, engine: SqlEngine): { text: string; values: unknown[] } {
  if (engine === "sqlite") return { text: fragment.text, values: [...fragment.values] };
  let n = 0;
  return { text: fragment.text.replace(/\?/g, () => `$${++n}`), values: [...fragment.values] };
}
