import { z } from "zod";
import { parseTrustedProxy } from "./auth/trusted-proxy.ts";

/** An on/off switch: exactly "1" turns it on; unset or anything else leaves it off. */
const flag = z.string().optional().transform((value) => value === "1");

/** Environment, validated once. Pure modules (lib/analysis, lib/stats) never import this. */
const envSchema = z.object({
  DATABASE_URL: z
    .string()
    .regex(/^(file:|postgres(ql)?:\/\/)/, "DATABASE_URL must start with file: (SQLite) or postgres:// (PostgreSQL)")
    .default("file:./data/lapsebank.db"),
  LAPSEBANK_MAX_UPLOAD_MB: z.coerce.number().positive().max(2048).default(50),
  LAPSEBANK_SESSION_DAYS: z.coerce.number().positive().default(14),
  /** Origin the app is reached at (`https://archive.example.org`): absolute links and `Location` headers use it. */
  LAPSEBANK_PUBLIC_URL: z
    .url({ protocol: /^https?$/, error: "LAPSEBANK_PUBLIC_URL must be an http:// or https:// URL" })
    .refine((value) => new URL(value).pathname === "/" && !new URL(value).search, "LAPSEBANK_PUBLIC_URL is an origin only (scheme, host, port), without a path")
    .optional(),
  /** Proxies believed about the client address and host: unset (socket address), a hop count, or addresses/CIDRs. */
  LAPSEBANK_TRUSTED_PROXY: z
    .string()
    .optional()
    .transform((value, ctx) => {
      try {
        return parseTrustedProxy(value);
      } catch (error) {
        ctx.addIssue({ code: "custom", message: error instanceof Error ? error.message : String(error) });
        return z.NEVER;
      }
    }),
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  PORT: z.coerce.number().int().positive().default(3000),
  /** Address `npm start` listens on; unset: 127.0.0.1 while no account exists, else every interface. */
  LAPSEBANK_HOST: z.string().trim().optional().transform((value) => value || undefined),
  /** The generic listen address some hosts set; LAPSEBANK_HOST wins over it. */
  HOST: z.string().trim().optional().transform((value) => value || undefined),
  /** "1": session cookies without the Secure flag in production (a plain-http school network). */
  LAPSEBANK_INSECURE_COOKIES: flag,
  /** "1": `npm start` never loads the demo archive into an empty database. */
  LAPSEBANK_SKIP_DEMO: flag,
  /** "1": `npm start` rebuilds the web app even when the build looks current. */
  LAPSEBANK_REBUILD: flag,
  /** Upload token for `lapsebank ingest --server` when --token is not given. */
  LAPSEBANK_TOKEN: z.string().optional().transform((value) => value || undefined),
  /** Password for `lapsebank admin create` (else the first line of stdin). */
  LAPSEBANK_ADMIN_PASSWORD: z.string().optional().transform((value) => value || undefined),
});

export type Env = z.infer<typeof envSchema>;

let cached: Env | undefined;

export function getEnv(): Env {
  cached ??= envSchema.parse(process.env);
  return cached;
}

export function isPostgresUrl(url: string): boolean {
  return /^postgres(ql)?:\/\//.test(url);
}
