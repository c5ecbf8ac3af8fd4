import { Zip, ZipDeflate } from "fflate";

/**
 * A zip being written: fflate emits output synchronously while entries are pushed; the queue holds
 * it until the consumer takes it, so at most one pushed chunk's compressed output waits in memory.
 */
export class ZipQueue {
  private readonly chunks: Uint8Array[] = [];
  private failure: Error | null = null;
  private readonly zip: Zip;

  constructor(private readonly mtime: Date) {
    this.zip = new Zip((error, data) => {
      if (error) this.failure = error;
      else this.chunks.push(data);
    });
  }

  /** Starts an entry; push its bytes with `push(bytes, last)`. Entries must be written one after another. */
  entry(name: string, level: 0 | 1 | 6 = 6): ZipDeflate {
    const entry = new ZipDeflate(name, { level });
    entry.mtime = this.mtime;
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
    return this.chunks.splice(0, this.chunks.length);
  }
}
