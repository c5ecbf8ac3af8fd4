import fs from "node:fs";

/**
 * Reads a file named on the command line for upload, never more than `maxBytes` (+1 to detect
 * overflow): devices, pipes and folders are refused before any read (`/dev/zero` never ends), and a
 * regular file over the upload limit is refused with its size, without being read into memory.
 */
export function readUploadFile(file: string, maxBytes: number): Uint8Array<ArrayBuffer> {
  const fd = fs.openSync(file, "r");
  try {
    const stat = fs.fstatSync(fd);
    if (!stat.isFile()) throw new Error(`${file} is not a regular file (a device, pipe or folder); name a logger file`);
    const limitMb = (maxBytes / 1048576).toFixed(0);
    if (stat.size > maxBytes) throw new Error(`${file} is ${(stat.size / 1048576).toFixed(1)} MB; the upload limit is ${limitMb} MB (LAPSEBANK_MAX_UPLOAD_MB)`);
    // The file may grow while it is read: read at most one byte past the limit.
    const buffer = Buffer.alloc(Math.min(stat.size, maxBytes) + 1);
    let length = 0;
    for (;;) {
      const read = fs.readSync(fd, buffer, length, buffer.length - length, null);
      if (read === 0) break;
      length += read;
      if (length > maxBytes) throw new Error(`${file} grew past the upload limit of ${limitMb} MB (LAPSEBANK_MAX_UPLOAD_MB) while it was read`);
      if (length === buffer.length) break;
    }
    // Buffer.alloc never hands out a SharedArrayBuffer.
    return new Uint8Array(buffer.buffer as ArrayBuffer, buffer.byteOffset, length);
  } finally {
    fs.closeSync(fd);
  }
}
