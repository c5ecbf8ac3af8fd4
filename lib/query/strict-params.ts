/**
 * Query-string schemas that refuse parameters they do not know. A misspelt or invented parameter
 * (`sites=` for `site=`) would otherwise be dropped in silence and the answer would cover more
 * flights than the asker meant; instead the request fails (422 in the API) naming the parameter.
 * Pure: no database, no environment.
 */
import { z } from "zod";

/** The sentence for unknown parameters: names each one and lists the parameters the query takes. */
export function unknownParametersMessage(unknown: readonly string[], allowed: readonly string[]): string {
  const named = unknown.map((key) => `"${key}"`).join(", ");
  return `unknown parameter${unknown.length === 1 ? "" : "s"} ${named}; the parameters are ${allowed.join(", ")}`;
}

/** A z.strictObject whose unknown-key issue reads as unknownParametersMessage(). */
export function strictQueryObject<Shape extends z.core.$ZodLooseShape>(shape: Shape) {
  const allowed = Object.keys(shape);
  return z.strictObject(shape, {
    error: (issue) => (issue.code === "unrecognized_keys" ? unknownParametersMessage(issue.keys, allowed) : undefined),
  });
}

/** The unknown parameters an issue list reports (none when every parameter was known). */
export function unknownParametersOf(issues: readonly z.core.$ZodIssue[]): string[] {
  return issues.flatMap((issue) => (issue.code === "unrecognized_keys" ? issue.keys : []));
}

/**
 * Reads a page's address leniently: a parameter that is unknown or does not validate is dropped and named in
 * `problems` (the page shows them), so one bad value does not throw away the rest. The API refuses instead.
 */
export function parseDroppingProblems<T>(schema: z.ZodType<T>, record: Record<string, string>): { value: T; problems: string[] } {
  const problems: string[] = [];
  const input: Record<string, string> = { ...record };
  for (let attempt = 0; attempt < 10; attempt++) {
    const parsed = schema.safeParse(input);
    if (parsed.success) return { value: parsed.data, problems };
    for (const issue of parsed.error.issues) {
      if (issue.code === "unrecognized_keys") {
        problems.push(`${issue.message} (ignored)`);
        for (const key of issue.keys) delete input[key];
        continue;
      }
      const key = String(issue.path[0] ?? "");
      problems.push(`${key || "filter"}: ${issue.message} (ignored)`);
      delete input[key];
    }
  }
  return { value: schema.parse({}), problems };
}
