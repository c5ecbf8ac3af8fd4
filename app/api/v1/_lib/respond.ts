import "server-only";
import { PermissionError } from "@/lib/auth/permissions";
import { publicOrigin } from "@/lib/auth/trusted-proxy";
import { getEnv } from "@/lib/env";
import type { z } from "zod";
import { IngestFailure, type IngestIssue } from "@/lib/ingest";
import { RequestBodyError } from "@/lib/http/request-body";
import { hasBearerToken, isSameOriginRequest, SAFE_METHODS } from "@/lib/http/same-origin";

/** The one error shape of every /api/v1 response. */
export interface ApiErrorBody {
  error: {
    code: string;
    message: string;
    issues?: IngestIssue[];
    existingFlightId?: string;
  };
}

export function jsonOk<T>(data: T, status = 200, headers?: HeadersInit): Response {
  return Response.json(data, { status, headers: { "Cache-Control": "no-store", ...headers } });
}

export function jsonError(status: number, code: string, message: string, extra: Omit<ApiErrorBody["error"], "code" | "message"> = {}): Response {
  const body: ApiErrorBody = { error: { code, message, ...extra } };
  return Response.json(body, { status, headers: { "Cache-Control": "no-store" } });
}

export function notFoundError(what = "Flight"): Response {
  return jsonError(404, "not-found", `${what} not found, or not visible to you`);
}

/** 400 for query or form fields that do not validate; the message names each field. */
export function validationError(error: z.ZodError): Response {
  const message = error.issues.map((i) => `${i.path.join(".") || "request"}: ${i.message}`).join("; ");
  return jsonError(400, "invalid-request", message);
}

/** Status for an ingest failure: duplicate 409, oversized 413, everything else about the file or its metadata 422. */
export function statusOfIngestFailure(failure: IngestFailure): number {
  if (failure.code === "duplicate") return 409;
  if (failure.code === "too-large") return 413;
  return 422;
}

export function ingestFailureResponse(failure: IngestFailure): Response {
  const message = failure.code === "duplicate"
    ? "This file was already uploaded for this school"
    : failure.issues.length === 1 ? (failure.issues[0]?.message ?? failure.code) : `${failure.issues.length} problems found in the upload`;
  return jsonError(statusOfIngestFailure(failure), failure.code, message, {
    issues: failure.issues,
    ...(failure.existingFlightId ? { existingFlightId: failure.existingFlightId } : {}),
  });
}

/**
 * Wraps a handler so an unexpected error still answers in the one error shape (details go to the
 * server log). Writes that do not carry an API token (a browser's session cookie, or nothing at all
 * in local mode) must come from one of our own pages: another site or another port of this host
 * gets 403 before the handler runs (see lib/http/same-origin.ts). Token writes are left as they are.
 */
export function withErrors<C extends unknown[]>(handler: (request: Request, ...context: C) => Promise<Response>): (request: Request, ...context: C) => Promise<Response> {
  return async (request: Request, ...context: C) => {
    try {
      if (!SAFE_METHODS.has(request.method) && !hasBearerToken(request.headers) && !isSameOriginRequest(request.headers, request.url)) {
        await request.body?.cancel().catch(() => undefined);
        return jsonError(403, "cross-origin", "This request came from another site; send it from Lapsebank's own pages, or with an API token");
      }
      return await handler(request, ...context);
    } catch (error) {
      if (error instanceof IngestFailure) return ingestFailureResponse(error);
      if (error instanceof PermissionError) return jsonError(error.status, error.status === 401 ? "unauthenticated" : "forbidden", error.message);
      if (error instanceof RequestBodyError) return jsonError(error.status, error.code, error.message);
      console.error("[api/v1]", error);
      return jsonError(500, "internal", "Something went wrong on the server; the error has been logged");
    }
  };
}

/**
 * Absolute URL of a path on this server as clients reach it: LAPSEBANK_PUBLIC_URL, else the host a
 * trusted proxy forwarded, else the request's own URL.
 */
export function absoluteUrl(request: Request, path: string): string {
  const env = getEnv();
  const origin = publicOrigin({ requestUrl: request.url, headers: request.headers, publicUrl: env.LAPSEBANK_PUBLIC_URL, proxy: env.LAPSEBANK_TRUSTED_PROXY });
  return new URL(path, origin).toString();
}
