/**
 * Reading a backup zip on disk through yauzl, which parses the central directory, checks every
 * offset against the file and inflates with Node's zlib. What yauzl leaves to its caller is done here,
 * as each entry streams: its CRC-32 (zlib.crc32) and, when the caller knows one, its SHA-256 are
 * checked at the end, and its inflated size may pass neither the size the central directory declares
 * nor a hard cap the caller sets, so a small entry that inflates to gigabytes is stopped after a few
 * kilobytes. Chunks stream with back-pressure: memory stays flat however large the entry.
 * [S: PKWARE APPNOTE.TXT, 4.4.7 CRC-32, 4.4.9 uncompressed size]
 */
import { createHash } from "node:crypto";
import zlib from "node:zlib";
import yauzl from "yauzl";

/** An entry that is missing, too large, damaged or not what the manifest says; the message names it. */
export class ZipEntryError extends Error {
  constructor(
    readonly entry: string,
    message: string,
  ) {
    super(`${entry}: ${message}`);
    this.name = "ZipEntryError";
  }
}

export interface EntryReadOptions {
  /** The most inflated bytes this entry may hold; a larger declared or actual size is refused. */
  maxBytes: number;
  /** Expected SHA-256 of the inflated bytes (hex), checked when the entry has been read to its end. */
  sha256?: string;
}

export interface EntryLine {
  text: string;
  /** 1-based, counting every line of the entry (empty ones too). */
  lineNumber: number;
}

export class ZipReader {
  private constructor(
    private readonly zip: yauzl.ZipFile,
    private readonly byName: Map<string, yauzl.Entry>,
  ) {}

  /** Opens the file and reads its central directory (entry names are checked; duplicate names are refused). */
  static async open(file: string): Promise<ZipReader> {
    const zip = await yauzl.openPromise(file, { lazyEntries: true, autoClose: false, strictFileNames: true, validateEntrySizes: true });
    try {
      const byName = new Map<string, yauzl.Entry>();
      for await (const entry of zip.eachEntry()) {
        if (byName.has(entry.fileName)) throw new Error(`the zip holds two entries named ${entry.fileName}`);
        byName.set(entry.fileName, entry);
      }
      return new ZipReader(zip, byName);
    } catch (error) {
      zip.close();
      throw error;
    }
  }

  has(name: string): boolean {
    return this.byName.has(name);
  }

  get names(): string[] {
    return [...this.byName.keys()];
  }

  /** The entry's inflated bytes as a stream of chunks, checked as described above. */
  async *chunks(name: string, options: EntryReadOptions): AsyncGenerator<Uint8Array> {
    const entry = this.byName.get(name);
    if (!entry) throw new ZipEntryError(name, "the backup has no such entry");
    if (entry.uncompressedSize > options.maxBytes) {
      throw new ZipEntryError(name, `declares ${entry.uncompressedSize} bytes, more than the ${options.maxBytes} a restore reads for such an entry`);
    }
    if (entry.isEncrypted() || (entry.compressionMethod !== 0 && entry.compressionMethod !== 8)) {
      throw new ZipEntryError(name, `compression method ${entry.compressionMethod}${entry.isEncrypted() ? " (encrypted)" : ""} is not supported`);
    }
    const limit = Math.min(entry.uncompressedSize, options.maxBytes);
    const hash = options.sha256 === undefined ? null : createHash("sha256");
    let stream: NodeJS.ReadableStream & { destroy(): void };
    try {
      stream = await this.zip.openReadStreamPromise(entry);
    } catch (error) {
      throw new ZipEntryError(name, (error as Error).message);
    }
    let crc = 0;
    let bytes = 0;
    try {
      for await (const chunk of stream as AsyncIterable<Buffer>) {
        bytes += chunk.length;
        if (bytes > limit) throw new ZipEntryError(name, `inflates to more than the ${limit} bytes its directory entry declares`);
        crc = zlib.crc32(chunk, crc);
        hash?.update(chunk);
        yield chunk;
      }
    } catch (error) {
      if (error instanceof ZipEntryError) throw error;
      throw new ZipEntryError(name, `cannot be read (${(error as Error).message}); the backup is damaged`);
    } finally {
      stream.destroy();
    }
    if (bytes !== entry.uncompressedSize) throw new ZipEntryError(name, `holds ${bytes} bytes but its directory entry declares ${entry.uncompressedSize}; the backup is damaged`);
    if (crc >>> 0 !== entry.crc32 >>> 0) throw new ZipEntryError(name, "its CRC-32 does not match its bytes; the backup is damaged");
    if (hash && options.sha256 !== undefined) {
      const actual = hash.digest("hex");
      if (actual !== options.sha256) throw new ZipEntryError(name, `its SHA-256 (${actual}) is not the one the manifest records (${options.sha256}); the backup is damaged or was altered`);
    }
  }

  /** The whole entry in memory (small entries: the manifest, one raw file). */
  async read(name: string, options: EntryReadOptions): Promise<Buffer> {
    const parts: Uint8Array[] = [];
    for await (const chunk of this.chunks(name, options)) parts.push(chunk);
    return Buffer.concat(parts);
  }

  /**
   * The entry's text line by line (UTF-8, strict). A line longer than `maxLineChars` is refused rather
   * than gathered; empty lines are skipped but counted.
   */
  async *lines(name: string, options: EntryReadOptions & { maxLineChars: number }): AsyncGenerator<EntryLine> {
    const decoder = new TextDecoder("utf-8", { fatal: true });
    let rest = "";
    let lineNumber = 0;
    const decode = (chunk?: Uint8Array) => {
      try {
        return chunk ? decoder.decode(chunk, { stream: true }) : decoder.decode();
      } catch {
        throw new ZipEntryError(name, `line ${lineNumber + 1} is not valid UTF-8; the backup is damaged`);
      }
    };
    for await (const chunk of this.chunks(name, options)) {
      rest += decode(chunk);
      const parts = rest.split("\n");
      rest = parts.pop() ?? "";
      for (const text of parts) {
        lineNumber++;
        if (text) yield { text, lineNumber };
      }
      if (rest.length > options.maxLineChars) throw new ZipEntryError(name, `line ${lineNumber + 1} is longer than ${options.maxLineChars} characters`);
    }
    rest += decode();
    if (rest) yield { text: rest, lineNumber: lineNumber + 1 };
  }

  async close(): Promise<void> {
    this.zip.close();
  }
}
