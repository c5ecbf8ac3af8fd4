import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { zipSync } from "fflate";
import { afterAll, describe, expect, test } from "vitest";
import { ZipEntryError, ZipReader } from "../../../lib/export/zip-reader.ts";
import { sha256Hex } from "../../support/backup-files.ts";

const dir = fs.mkdtempSync(path.join(os.tmpdir(), "lapsebank-zip-reader-"));
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }));

function zipFile(name: string, entries: Record<string, Uint8Array>): string {
  const file = path.join(dir, name);
  fs.writeFileSync(file, zipSync(entries, { level: 6 }));
  return file;
}

const encode = (text: string) => new TextEncoder().encode(text);
const refusal = (promise: Promise<unknown>) => promise.then(() => null, (e: unknown) => e);

async function drain(lines: AsyncIterable<unknown>): Promise<number> {
  let n = 0;
  for await (const _ of lines) n++;
  return n;
}

describe("zip reader", () => {
  test("reads lines with their numbers (empty lines counted) and checks CRC-32 and SHA-256", async () => {
    const text = "a\n\nb\nc";
    const file = zipFile("lines.zip", { "t.ndjson": encode(text) });
    const zip = await ZipReader.open(file);
    try {
      const lines = [];
      for await (const line of zip.lines("t.ndjson", { maxBytes: 100, maxLineChars: 10, sha256: sha256Hex(encode(text)) })) lines.push(line);
      expect(lines).toEqual([{ text: "a", lineNumber: 1 }, { text: "b", lineNumber: 3 }, { text: "c", lineNumber: 4 }]);
      const wrong = await refusal(zip.read("t.ndjson", { maxBytes: 100, sha256: "0".repeat(64) }));
      expect(wrong).toBeInstanceOf(ZipEntryError);
      expect((wrong as Error).message).toMatch(/^t\.ndjson: its SHA-256 .* is not the one the manifest records/);
    } finally {
      await zip.close();
    }
  });

  test("an entry that declares more than the cap is refused before it is inflated", async () => {
    const file = zipFile("large.zip", { "big.bin": new Uint8Array(1 << 20) });
    const zip = await ZipReader.open(file);
    try {
      const error = await refusal(zip.read("big.bin", { maxBytes: 1000 }));
      expect((error as Error).message).toBe(`big.bin: declares ${1 << 20} bytes, more than the 1000 a restore reads for such an entry`);
    } finally {
      await zip.close();
    }
  });

  test("a line longer than the cap is refused, not gathered", async () => {
    const file = zipFile("long-line.zip", { "t.ndjson": encode(`ok\n${"x".repeat(200_000)}\n`) });
    const zip = await ZipReader.open(file);
    try {
      const error = await refusal(drain(zip.lines("t.ndjson", { maxBytes: 1 << 20, maxLineChars: 50_000 })));
      expect((error as Error).message).toMatch(/^t\.ndjson: line 2 is longer than 50000 characters/);
    } finally {
      await zip.close();
    }
  });

  test("a missing entry and a file that is not a zip are errors", async () => {
    const file = zipFile("one.zip", { "a.txt": encode("a") });
    const zip = await ZipReader.open(file);
    try {
      expect(((await refusal(zip.read("b.txt", { maxBytes: 10 }))) as Error).message).toBe("b.txt: the backup has no such entry");
    } finally {
      await zip.close();
    }
    const notZip = path.join(dir, "not.zip");
    fs.writeFileSync(notZip, "hello");
    await expect(ZipReader.open(notZip)).rejects.toThrow();
  });
});
