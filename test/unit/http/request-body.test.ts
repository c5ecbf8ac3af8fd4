import { describe, expect, test } from "vitest";
import { z } from "zod";
import { MULTIPART_OVERHEAD_BYTES, readBodyBytes, readJsonBody, readMultipartBody, RequestBodyError } from "@/lib/http/request-body";

const BOUNDARY = "unit-boundary";
const encoder = new TextEncoder();

/** A stream that counts what is pulled from it. */
function counted(chunks: Uint8Array[]) {
  let pulled = 0;
  let index = 0;
  const stream = new ReadableStream<Uint8Array>({
    pull(controller) {
      const next = chunks[index++];
      if (!next) return controller.close();
      pulled += next.byteLength;
      controller.enqueue(next);
    },
  }, { highWaterMark: 0 });
  return { stream, pulled: () => pulled };
}

function request(body: ReadableStream<Uint8Array> | Uint8Array | string, headers: Record<string, string>): Request {
  return new Request("http://lab.test/x", { method: "POST", body, headers, duplex: "half" } as RequestInit);
}

function multipart(parts: Array<{ name: string; value: string; fileName?: string }>): Uint8Array {
  const text = parts.map((p) => `--${BOUNDARY}\r\nContent-Disposition: form-data; name="${p.name}"${p.fileName ? `; filename="${p.fileName}"` : ""}\r\n\r\n${p.value}\r\n`).join("") + `--${BOUNDARY}--\r\n`;
  return encoder.encode(text);
}

async function refusal(promise: Promise<unknown>): Promise<RequestBodyError> {
  try {
    await promise;
  } catch (error) {
    if (error instanceof RequestBodyError) return error;
    throw error;
  }
  throw new Error("expected a refusal");
}

describe("bounded request bodies", () => {
  test("a body is read whole up to the limit, and reading stops just past it", async () => {
    const chunk = new Uint8Array(1000).fill(7);
    expect((await readBodyBytes(request(counted([chunk, chunk]).stream, {}), 2000)).byteLength).toBe(2000);
    const endless = counted(Array.from({ length: 1000 }, () => chunk));
    expect((await refusal(readBodyBytes(request(endless.stream, {}), 2500))).status).toBe(413);
    expect(endless.pulled()).toBe(3000);
  });

  test("a declared Content-Length over the limit is refused before reading", async () => {
    const body = counted([new Uint8Array(10)]);
    expect((await refusal(readBodyBytes(request(body.stream, { "content-length": "5000" }), 4000))).status).toBe(413);
    expect(body.pulled()).toBe(0);
  });

  test("JSON needs application/json (415), parses (400) and validates", async () => {
    const schema = z.object({ n: z.number() });
    expect((await refusal(readJsonBody(request('{"n":1}', { "content-type": "text/plain" }), schema))).status).toBe(415);
    expect((await refusal(readJsonBody(request("{", { "content-type": "application/json" }), schema))).status).toBe(400);
    const ok = await readJsonBody(request('{"n":1}', { "content-type": "application/json; charset=utf-8" }), schema);
    expect(ok.success && ok.data).toEqual({ n: 1 });
  });

  test("multipart: fields and one file; the file is kept in one buffer", async () => {
    const body = multipart([{ name: "schoolId", value: "s1" }, { name: "file", value: "a,b\n1,2\n", fileName: "f.csv" }, { name: "title", value: "late field" }]);
    const parsed = await readMultipartBody(request(body, { "content-type": `multipart/form-data; boundary=${BOUNDARY}` }), { fileField: "file", maxFileBytes: 1000 });
    expect(parsed.fields).toEqual({ schoolId: "s1", title: "late field" });
    expect(parsed.file?.name).toBe("f.csv");
    expect(parsed.file?.bytes.toString("utf8")).toBe("a,b\n1,2\n");
    expect(parsed.file?.sizeBytes).toBe(8);
  });

  test("multipart: a file over the limit is 413; keepFileBytes keeps only the start but counts all", async () => {
    const body = multipart([{ name: "file", value: "x".repeat(5000), fileName: "big.csv" }]);
    const headers = { "content-type": `multipart/form-data; boundary=${BOUNDARY}` };
    expect((await refusal(readMultipartBody(request(body, headers), { fileField: "file", maxFileBytes: 4000 }))).status).toBe(413);
    const head = await readMultipartBody(request(body, headers), { fileField: "file", maxFileBytes: 6000, keepFileBytes: 100 });
    expect(head.file?.bytes.byteLength).toBe(100);
    expect(head.file?.sizeBytes).toBe(5000);
  });

  test("multipart: beforeFile sees the fields sent before the file and can stop the read", async () => {
    const head = encoder.encode(`--${BOUNDARY}\r\nContent-Disposition: form-data; name="schoolId"\r\n\r\nother\r\n--${BOUNDARY}\r\nContent-Disposition: form-data; name="file"; filename="f"\r\n\r\n`);
    const filler = new Uint8Array(64 * 1024).fill(0x31);
    const body = counted([head, ...Array.from({ length: 100 }, () => filler)]);
    let seen: Record<string, string> = {};
    const stop = new Error("not this school");
    await expect(readMultipartBody(request(body.stream, { "content-type": `multipart/form-data; boundary=${BOUNDARY}` }), {
      fileField: "file",
      maxFileBytes: 10 * 1024 * 1024,
      beforeFile: (fields) => {
        seen = { ...fields };
        throw stop;
      },
    })).rejects.toBe(stop);
    expect(seen).toEqual({ schoolId: "other" });
    expect(body.pulled()).toBeLessThan(2 * filler.byteLength);
  });

  test("multipart: not multipart is 415, a cut-off body is 400, and the overhead allowance is bounded", async () => {
    expect((await refusal(readMultipartBody(request("a=1", { "content-type": "application/x-www-form-urlencoded" }), { fileField: "file", maxFileBytes: 10 }))).status).toBe(415);
    const cut = encoder.encode(`--${BOUNDARY}\r\nContent-Disposition: form-data; name="file"; filename="f"\r\n\r\nabc`);
    expect((await refusal(readMultipartBody(request(cut, { "content-type": `multipart/form-data; boundary=${BOUNDARY}` }), { fileField: "file", maxFileBytes: 10 }))).status).toBe(400);
    expect(MULTIPART_OVERHEAD_BYTES).toBeLessThanOrEqual(1024 * 1024);
  });
});
