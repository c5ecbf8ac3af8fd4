import { describe, expect, test } from "vitest";
import { z } from "zod";
import { IngestFailure } from "@/lib/ingest/errors";
import { ingestFailureResponse, jsonError, statusOfIngestFailure, validationError, withErrors } from "@/app/api/v1/_lib/respond";

const issue = (code: string) => ({ code, message: `${code} happened`, file: "f.csv", line: 3, column: 2, columnName: "temp" });

describe("API error shape", () => {
  test.each([
    ["duplicate", 409],
    ["too-large", 413],
    ["bad-rows", 422],
    ["invalid-metadata", 422],
    ["unknown-reference", 422],
  ])("%s answers %i", (code, status) => {
    expect(statusOfIngestFailure(new IngestFailure(code, [issue(code)]))).toBe(status);
  });

  test("ingest failures carry their issues and the existing flight", async () => {
    const response = ingestFailureResponse(new IngestFailure("duplicate", [issue("duplicate")], "flight-1"));
    expect(response.status).toBe(409);
    const body = await response.json();
    expect(body).toEqual({ error: { code: "duplicate", message: "This file was already uploaded for this school", issues: [issue("duplicate")], existingFlightId: "flight-1" } });
  });

  test("one issue gives its own message", async () => {
    const body = await ingestFailureResponse(new IngestFailure("bad-rows", [issue("not-a-number")])).json();
    expect(body.error.message).toBe("not-a-number happened");
    expect(body.error.existingFlightId).toBeUndefined();
  });

  test("validation errors name the field", async () => {
    const parsed = z.object({ page: z.number() }).safeParse({ page: "x" });
    if (parsed.success) throw new Error("expected a validation error");
    const response = validationError(parsed.error);
    expect(response.status).toBe(400);
    const body = await response.json();
    expect(body.error.code).toBe("invalid-request");
    expect(body.error.message).toMatch(/^page: /);
  });

  test("unexpected errors become a 500 in the same shape; ingest failures keep their status", async () => {
    const original = console.error;
    console.error = () => undefined;
    try {
      const crash = await withErrors(async () => { throw new Error("boom"); })(new Request("http://localhost/api/v1/x"));
      expect(crash.status).toBe(500);
      expect((await crash.json()).error.code).toBe("internal");
    } finally {
      console.error = original;
    }
    const failed = await withErrors(async () => { throw new IngestFailure("too-large", [issue("too-large")]); })(new Request("http://localhost/api/v1/x"));
    expect(failed.status).toBe(413);
    expect((await jsonError(404, "not-found", "x").json()).error).toEqual({ code: "not-found", message: "x" });
  });
});
