import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, test } from "vitest";
import { readUploadFile } from "../../../lib/cli/read-upload-file.ts";

describe("CLI ingest reads files with the upload limit", () => {
  test("/dev/zero (a device that never ends) is refused before any read", () => {
    expect(() => readUploadFile("/dev/zero", 50 * 1048576)).toThrow("/dev/zero is not a regular file");
  });

  test("a file over the limit is refused with its size; one within it is read whole", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "lapsebank-read-"));
    const file = path.join(dir, "flight.csv");
    fs.writeFileSync(file, Buffer.alloc(2 * 1048576, 65));
    expect(() => readUploadFile(file, 1048576)).toThrow(/is 2\.0 MB; the upload limit is 1 MB/);
    expect(readUploadFile(file, 2 * 1048576).byteLength).toBe(2 * 1048576);
    fs.rmSync(dir, { recursive: true, force: true });
  });
});
