// The parts of busboy (shipped with Next.js as next/dist/compiled/busboy) that request-body.ts uses.
declare module "next/dist/compiled/busboy" {
  import type { Readable, Writable } from "node:stream";

  interface BusboyLimits {
    fieldNameSize?: number;
    fieldSize?: number;
    fields?: number;
    fileSize?: number;
    files?: number;
    parts?: number;
    headerPairs?: number;
  }
  interface BusboyConfig {
    headers: { "content-type": string; [name: string]: string | undefined };
    limits?: BusboyLimits;
    defParamCharset?: string;
  }
  interface FileInfo {
    filename: string | undefined;
    encoding: string;
    mimeType: string;
  }
  interface FieldInfo {
    nameTruncated: boolean;
    valueTruncated: boolean;
    encoding: string;
    mimeType: string;
  }
  interface Busboy extends Writable {
    on(event: "file", listener: (name: string, stream: Readable & { truncated?: boolean }, info: FileInfo) => void): this;
    on(event: "field", listener: (name: string, value: string, info: FieldInfo) => void): this;
    on(event: "partsLimit" | "filesLimit" | "fieldsLimit" | "close" | "finish" | "drain", listener: () => void): this;
    on(event: "error", listener: (error: Error) => void): this;
  }
  function busboy(config: BusboyConfig): Busboy;
  export default busboy;
}
