import { once } from "node:events";
import zlib from "node:zlib";
import { Zip, ZipDeflate, type AsyncFlateStreamHandler, type ZipInputFile } from "fflate";

/**
 * A zip entry compressed by Node's zlib (native code, on the libuv thread pool) rather than fflate's
 * JavaScript deflate: for the large tables of an export, compression then runs beside the thread
 * that formats rows instead of taking turns with it. fflate still writes the zip structure; it reads
 * size and CRC-32 when the last chunk arrives (they go into the data descriptor).
 */
export class NativeDeflateEntry implements ZipInputFile {
  size = 0;
  crc = 0;
  readonly compression = 8;
  ondata?: AsyncFlateStreamHandler;
  private readonly deflate: zlib.DeflateRaw;
  private runningCrc = 0;
  private failure: Error | null = null;

  constructor(
    readonly filename: string,
    readonly mtime: Date,
    level: number,
  ) {
    this.deflate = zlib.createDeflateRaw({ level });
    this.deflate.on("data", (chunk: Buffer) => this.ondata?.(null, new Uint8Array(chunk.buffer as ArrayBuffer, chunk.byteOffset, chunk.length), false));
    this.deflate.on("error", (error) => {
      this.failure = error;
    });
  }

  /** Adds bytes; waits only when zlib has a backlog. `consumed` runs once zlib no longer needs them. */
  async write(bytes: Uint8Array, consumed?: () => void): Promise<void> {
    if (this.failure) throw this.failure;
    this.runningCrc = zlib.crc32(bytes, this.runningCrc);
    this.size += bytes.length;
    if (!this.deflate.write(bytes, consumed && (() => consumed()))) await once(this.deflate, "drain");
  }

  /** Flushes the compressor and closes the entry. */
  async end(): Promise<void> {
    const ended = once(this.deflate, "end");
    this.deflate.end();
    await ended;
    if (this.failure) throw this.failure;
    this.crc = this.runningCrc >>> 0;
    this.ondata?.(null, new Uint8Array(0), true);
  }
}

/**
 * A zip being written: fflate emits output as entries are pushed; the queue holds it until the
 * consumer takes it. Entries may be written at the same time: fflate keeps a later entry's
 * compressed bytes until the entries before it are complete, and writes them in the order the
 * entries were started. Writers call `room()` before pushing, so the queue never holds more than
 * about `limitBytes` of output a slow consumer has not taken yet.
 */
export class ZipQueue {
  private readonly chunks: Uint8Array[] = [];
  private queuedBytes = 0;
  private failure: Error | null = null;
  private readonly zip: Zip;
  private wakeConsumer: (() => void) | null = null;
  private wakeWriters: Array<() => void> = [];

  constructor(
    private readonly mtime: Date,
    private readonly limitBytes = 16 * 1048576,
  ) {
    this.zip = new Zip((error, data) => {
      if (error) this.failure = error;
      else {
        this.chunks.push(data);
        this.queuedBytes += data.length;
      }
      this.wakeConsumer?.();
    });
  }

  /** Starts an entry compressed by fflate; push its bytes with `push(bytes, last)`. */
  entry(name: string, level: 0 | 1 | 6 = 6): ZipDeflate {
    const entry = new ZipDeflate(name, { level });
    entry.mtime = this.mtime;
    this.zip.add(entry);
    return entry;
  }

  /** Starts a large entry compressed by native zlib; `await write(bytes)` then `await end()`. */
  nativeEntry(name: string, level = 1): NativeDeflateEntry {
    const entry = new NativeDeflateEntry(name, this.mtime, level);
    this.zip.add(entry);
    return entry;
  }

  /** Writes a whole small entry. */
  text(name: string, text: string): void {
    this.entry(name).push(new TextEncoder().encode(text), true);
  }

  end(): void {
    this.zip.end();
  }

  /** Output produced since the last call. */
  take(): Uint8Array[] {
    if (this.failure) throw this.failure;
    const taken = this.chunks.splice(0, this.chunks.length);
    this.queuedBytes = 0;
    const writers = this.wakeWriters;
    this.wakeWriters = [];
    for (const wake of writers) wake();
    return taken;
  }

  /** Resolves once the consumer has taken enough output for writers to go on. */
  async room(): Promise<void> {
    while (this.queuedBytes >= this.limitBytes) await new Promise<void>((resolve) => this.wakeWriters.push(resolve));
  }

  /** Resolves when new output arrives (or at once if some is waiting). */
  async output(): Promise<void> {
    if (this.chunks.length || this.failure) return;
    await new Promise<void>((resolve) => {
      this.wakeConsumer = () => {
        this.wakeConsumer = null;
        resolve();
      };
    });
  }
}
