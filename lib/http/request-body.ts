import busboy from "next/dist/compiled/busboy";
import type { z } from "zod";

/**
 * Reading request bodies with a byte limit: every body is counted while it streams in and reading
 * stops at the limit (413), so nobody can make the server buffer more than that. Callers check who
 * is asking before they read anything.
 */
export class RequestBodyError extends Error {
  constructor(readonly status: 400 | 413 | 415, readonly code: "invalid-request" | "too-large" | "unsupported-media-type", message: string) {
    super(message);
    this.name = "RequestBodyError";
  }
}

/** Largest JSON body any /api/v1 route takes (10,000 flight ids of a re-analysis fit with room to spare). */
export const MAX_JSON_BODY_BYTES = 1024 * 1024;

/** Room for multipart framing and the metadata fields next to the one file. */
export const MULTIPART_OVERHEAD_BYTES = 256 * 1024;

function megabytes(bytes: number): string {
  return `${(bytes / 1048576).toFixed(1).replace(/\.0$/, "")} MB`;
}

function tooLarge(limitBytes: number, what = "The request body"): RequestBodyError {
  return new RequestBodyError(413, "too-large", `${what} is over the limit of ${megabytes(limitBytes)}`);
}

function mediaType(request: Request): string {
  return (request.headers.get("content-type") ?? "").split(";")[0]?.trim().toLowerCase() ?? "";
}

/** The declared Content-Length, or null when absent (chunked) or not a number. */
function declaredLength(request: Request): number | null {
  const value = request.headers.get("content-length");
  if (value === null || !/^\d+$/.test(value.trim())) return null;
  return Number(value);
}

/** Bytes in one growing buffer (one copy of the data; doubles as needed, never past `capBytes`). */
class ByteSink {
  private buffer: Buffer;
  length = 0;

  constructor(initialBytes: number, private readonly capBytes: number) {
    this.buffer = Buffer.allocUnsafe(Math.max(1, Math.min(initialBytes, capBytes)));
  }

  /** False (and nothing kept) when the chunk would pass the cap. */
  push(chunk: Uint8Array): boolean {
    const needed = this.length + chunk.byteLength;
    if (needed > this.capBytes) return false;
    if (needed > this.buffer.length) {
      const grown = Buffer.allocUnsafe(Math.min(this.capBytes, Math.max(needed, this.buffer.length * 2)));
      this.buffer.copy(grown, 0, 0, this.length);
      this.buffer = grown;
    }
    this.buffer.set(chunk, this.length);
    this.length = needed;
    return true;
  }

  bytes(): Buffer {
    return this.buffer.subarray(0, this.length);
  }
}

/** Reads a whole body into one buffer, stopping with 413 as soon as more than `maxBytes` arrive. */
export async function readBodyBytes(request: Request, maxBytes: number): Promise<Buffer> {
  const declared = declaredLength(request);
  if (declared !== null && declared > maxBytes) {
    await request.body?.cancel().catch(() => undefined);
    throw tooLarge(maxBytes);
  }
  const sink = new ByteSink(declared ?? 16 * 1024, maxBytes);
  if (!request.body) return sink.bytes();
  const reader = request.body.getReader();
  for (;;) {
    const { done, value } = await reader.read();
    if (done) return sink.bytes();
    if (!sink.push(value)) {
      await reader.cancel().catch(() => undefined);
      throw tooLarge(maxBytes);
    }
  }
}

/**
 * A JSON body validated with the route's one schema: 415 unless `Content-Type: application/json`
 * (a form on another site can send text/plain that happens to be JSON), 413 over `maxBytes`,
 * 400 for bad JSON; the zod result is returned as is.
 */
export async function readJsonBody<S extends z.ZodType>(request: Request, schema: S, maxBytes = MAX_JSON_BODY_BYTES): Promise<ReturnType<S["safeParse"]>> {
  if (mediaType(request) !== "application/json") {
    await request.body?.cancel().catch(() => undefined);
    throw new RequestBodyError(415, "unsupported-media-type", "Send the body as JSON with Content-Type: application/json");
  }
  const bytes = await readBodyBytes(request, maxBytes);
  let body: unknown;
  try {
    body = JSON.parse(bytes.toString("utf8"));
  } catch {
    throw new RequestBodyError(400, "invalid-request", "The body is not valid JSON");
  }
  return schema.safeParse(body) as ReturnType<S["safeParse"]>;
}

export interface MultipartFile {
  /** The file name the client sent ("" when none). */
  name: string;
  /** The kept bytes: the whole file, or its first `keepFileBytes`. */
  bytes: Buffer;
  /** The file's full size in bytes, also when only its start was kept. */
  sizeBytes: number;
}

export interface MultipartOptions {
  /** The form field that holds the file. */
  fileField: string;
  /** Largest file accepted (413 past it). The whole body may be `MULTIPART_OVERHEAD_BYTES` larger. */
  maxFileBytes: number;
  /** Keep only this many bytes of the file (the rest is counted and dropped); default: all of it. */
  keepFileBytes?: number;
  /**
   * Called with the text fields read so far when the file starts (clients that send the fields
   * first are refused before their file is read); throwing stops reading.
   */
  beforeFile?: (fields: Readonly<Record<string, string>>) => void;
}

/**
 * A multipart/form-data body streamed through busboy: text fields (64 KB each, at most 64) and one
 * file written straight into one buffer (sized from Content-Length when given). Reading stops with
 * 413 once the file passes `maxFileBytes` or the body passes it plus `MULTIPART_OVERHEAD_BYTES`;
 * 415 when the body is not multipart, 400 when it cannot be parsed.
 */
export async function readMultipartBody(request: Request, options: MultipartOptions): Promise<{ fields: Record<string, string>; file: MultipartFile | null }> {
  const contentType = request.headers.get("content-type") ?? "";
  if (mediaType(request) !== "multipart/form-data") {
    await request.body?.cancel().catch(() => undefined);
    throw new RequestBodyError(415, "unsupported-media-type", "Send multipart/form-data");
  }
  const maxBodyBytes = options.maxFileBytes + MULTIPART_OVERHEAD_BYTES;
  const declared = declaredLength(request);
  if (declared !== null && declared > maxBodyBytes) {
    await request.body?.cancel().catch(() => undefined);
    throw tooLarge(options.maxFileBytes, "The file");
  }
  if (!request.body) throw new RequestBodyError(400, "invalid-request", "The multipart body is empty");

  let parser: ReturnType<typeof busboy>;
  try {
    parser = busboy({
      headers: { "content-type": contentType },
      limits: { fields: 64, fieldSize: 64 * 1024, files: 1, fileSize: options.maxFileBytes, parts: 66 },
    });
  } catch {
    throw new RequestBodyError(400, "invalid-request", "The multipart body could not be read (no boundary in Content-Type)");
  }
  const fields: Record<string, string> = {};
  let file: MultipartFile | null = null;
  let failure: Error | null = null;
  let fileDone: Promise<void> = Promise.resolve();
  const keepBytes = Math.min(options.keepFileBytes ?? options.maxFileBytes, options.maxFileBytes);
  const fail = (error: Error) => {
    failure ??= error;
  };

  parser.on("field", (name, value, info) => {
    if (info.valueTruncated) fail(new RequestBodyError(413, "too-large", `The field ${name} is over 64 KB`));
    else fields[name] = value;
  });
  parser.on("file", (name, stream, info) => {
    // Stopping early destroys the part being read with "Unexpected end of file": expected, not an error.
    stream.on("error", () => undefined);
    if (name !== options.fileField || file !== null || failure) {
      stream.resume();
      return;
    }
    try {
      options.beforeFile?.(fields);
    } catch (error) {
      fail(error instanceof Error ? error : new Error(String(error)));
      stream.resume();
      return;
    }
    const sink = new ByteSink(Math.min(declared ?? 1024 * 1024, keepBytes), keepBytes);
    const current: MultipartFile = { name: info.filename ?? "", bytes: Buffer.alloc(0), sizeBytes: 0 };
    file = current;
    fileDone = new Promise<void>((resolve) => {
      stream.on("data", (chunk: Buffer) => {
        current.sizeBytes += chunk.byteLength;
        if (sink.length < keepBytes) sink.push(chunk.subarray(0, keepBytes - sink.length));
      });
      stream.on("limit", () => fail(tooLarge(options.maxFileBytes, "The file")));
      stream.on("end", () => {
        current.bytes = sink.bytes();
        resolve();
      });
      stream.on("error", (error: Error) => {
        fail(new RequestBodyError(400, "invalid-request", `The multipart body could not be read: ${error.message}`));
        resolve();
      });
    });
  });
  parser.on("partsLimit", () => fail(new RequestBodyError(413, "too-large", "Too many parts in the multipart body")));
  parser.on("fieldsLimit", () => fail(new RequestBodyError(413, "too-large", "Too many fields in the multipart body")));
  const parsed = new Promise<void>((resolve) => {
    parser.on("close", () => resolve());
    parser.on("error", (error) => {
      fail(new RequestBodyError(400, "invalid-request", `The multipart body could not be read: ${error.message}`));
      resolve();
    });
  });

  const reader = request.body.getReader();
  let bodyBytes = 0;
  try {
    for (;;) {
      if (failure) break;
      const { done, value } = await reader.read();
      if (done) {
        parser.end();
        break;
      }
      bodyBytes += value.byteLength;
      if (bodyBytes > maxBodyBytes) {
        fail(tooLarge(options.maxFileBytes, "The file"));
        break;
      }
      if (!parser.write(value)) await new Promise<void>((resolve) => parser.once("drain", resolve));
    }
  } finally {
    if (failure) {
      await reader.cancel().catch(() => undefined);
      parser.destroy();
    }
  }
  if (!failure) await parsed;
  if (!failure) await fileDone;
  if (failure) throw failure;
  return { fields, file };
}
