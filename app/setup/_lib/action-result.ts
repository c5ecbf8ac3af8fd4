import type { z } from "zod";

/** What every Setup server action returns: data, or a message with per-field errors for the form. */
export type ActionResult<T> = { ok: true; data: T } | { ok: false; message: string; fieldErrors: Record<string, string[]> };

export function actionOk<T>(data: T): ActionResult<T> {
  return { ok: true, data };
}

export function actionFailure(message: string, fieldErrors: Record<string, string[]> = {}): ActionResult<never> {
  return { ok: false, message, fieldErrors };
}

/** Field errors keyed by the zod path ("spec.sensor.scaleMvPerK"), optionally under a prefix. */
export function zodFailure(error: z.ZodError, message = "Some fields need attention", prefix = ""): ActionResult<never> {
  const fieldErrors: Record<string, string[]> = {};
  for (const issue of error.issues) {
    const key = [prefix, ...issue.path.map(String)].filter(Boolean).join(".") || "form";
    (fieldErrors[key] ??= []).push(issue.message);
  }
  return { ok: false, message, fieldErrors };
}
