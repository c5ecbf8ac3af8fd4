/**
 * Random-access reading of a zip file on disk: the central directory gives each entry's place,
 * and an entry is inflated as a stream of chunks, so restoring a large backup never holds the
 * whole file in memory. Handles the stored and deflate methods without ZIP64 (entries and the
 * file under 4 GiB), which is what fflate writes.
 * [S: PKWARE APPNOTE.TXT, sections 4.3.7 local file header, 4.3.12 central directory, 4.3.16 end of central directory]
 */
import fs from "node:fs/promises";
import { Inflate } from "fflate";

export interface ZipEntryInfo {
  name: string;
  method: number;
  compressedSize: number;
  uncompressedSize: number;
  localHeaderOffset: number;
}

const EOCD_SIGNATURE = 0x06054b50;
const CENTRAL_SIGNATURE = 0x02014b50;
const LOCAL_SIGNATURE = 0x04034b50;

export class ZipReader {
  private constructor(
    private readonly handle: fs.FileHandle,
    readonly entries: Map<string, ZipEntryInfo>,
  ) {}

  static async open(file: string): Promise<ZipReader> {
    const handle = await fs.open(file, "r");
    try {
      const { size } = await handle.stat();
      const tailLength = Math.min(size, 22 + 65_535);
      const tail = Buffer.alloc(tailLength);
      await handle.read(tail, 0, tailLength, size - tailLength);
      let eocd = -1;
      for (let i = tailLength - 22; i >= 0; i--) {
        if (tail.readUInt32LE(i) === EOCD_SIGNATURE) {
          eocd = i;
          break;
        }
      }
      if (eocd < 0) throw new Error("not a zip file (no end-of-central-directory record)");
      const count = tail.readUInt16LE(eocd + 10);
      const directorySize = tail.readUInt32LE(eocd + 12);
      const directoryOffset = tail.readUInt32LE(eocd + 16);
      if (count === 0xffff || directoryOffset === 0xffffffff) throw new Error("ZIP64 archives are not supported");
      const directory = Buffer.alloc(directorySize);
      await handle.read(directory, 0, directorySize, directoryOffset);
      const entries = new Map<string, ZipEntryInfo>();
      let at = 0;
      for (let n = 0; n < count; n++) {
        if (directory.readUInt32LE(at) !== CENTRAL_SIGNATURE) throw new Error("corrupt zip central directory");
        const method = directory.readUInt16LE(at + 10);
        const compressedSize = directory.readUInt32LE(at + 20);
        const uncompressedSize = directory.readUInt32LE(at + 24);
        const nameLength = directory.readUInt16LE(at + 28);
        const extraLength = directory.readUInt16LE(at + 30);
        const commentLength = directory.readUInt16LE(at + 32);
        const localHeaderOffset = directory.readUInt32LE(at + 42);
        const name = directory.toString("utf8", at + 46, at + 46 + nameLength);
        entries.set(name, { name, method, compressedSize, uncompressedSize, localHeaderOffset });
        at += 46 + nameLength + extraLength + commentLength;
      }
      return new ZipReader(handle, entries);
    } catch (error) {
      await handle.close();
      throw error;
    }
  }

  /** The entry's uncompressed bytes as a stream of chunks. */
  async *chunks(name: string, readSize = 1 << 20): AsyncGenerator<Uint8Array> {
    const entry = this.entries.get(name);
    if (!entry) throw new Error(`the zip has no entry ${name}`);
    if (entry.method !== 0 && entry.method !== 8) throw new Error(`entry ${name}: compression method ${entry.method} is not supported`);
    const header = Buffer.alloc(30);
    await this.handle.read(header, 0, 30, entry.localHeaderOffset);
    if (header.readUInt32LE(0) !== LOCAL_SIGNATURE) throw new Error(`entry ${name}: corrupt local header`);
    const dataStart = entry.localHeaderOffset + 30 + header.readUInt16LE(26) + header.readUInt16LE(28);
    const out: Uint8Array[] = [];
    const inflate = entry.method === 8 ? new Inflate((data) => out.push(data)) : null;
    for (let done = 0; done < entry.compressedSize; ) {
      const length = Math.min(readSize, entry.compressedSize - done);
      const buffer = new Uint8Array(length);
      const { bytesRead } = await this.handle.read(buffer, 0, length, dataStart + done);
      if (bytesRead !== length) throw new Error(`entry ${name}: file ends early`);
      done += length;
      if (inflate) {
        inflate.push(buffer, done === entry.compressedSize);
        yield* out.splice(0, out.length);
      } else {
        yield buffer;
      }
    }
    if (inflate && entry.compressedSize === 0) inflate.push(new Uint8Array(0), true);
    yield* out.splice(0, out.length);
  }

  /** The whole entry in memory (for small entries: the manifest, one raw file). */
  async read(name: string): Promise<Uint8Array> {
    const parts: Uint8Array[] = [];
    let length = 0;
    for await (const chunk of this.chunks(name)) {
      parts.push(chunk);
      length += chunk.length;
    }
    const out = new Uint8Array(length);
    let at = 0;
    for (const part of parts) {
      out.set(part, at);
      at += part.length;
    }
    return out;
  }

  /** The entry's text, line by line (UTF-8; a line may be long, chunks are split anywhere). */
  async *lines(name: string): AsyncGenerator<string> {
    const decoder = new TextDecoder("utf-8", { fatal: true });
    let rest = "";
    for await (const chunk of this.chunks(name)) {
      rest += decoder.decode(chunk, { stream: true });
      const parts = rest.split("\n");
      rest = parts.pop() ?? "";
      for (const line of parts) if (line) yield line;
    }
    rest += decoder.decode();
    if (rest) yield rest;
  }

  async close(): Promise<void> {
    await this.handle.close();
  }
}
