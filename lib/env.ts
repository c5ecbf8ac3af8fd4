import { z } from "zod";

/** Environment, validated once. Pure modules (lib/analysis, lib/stats) never import this. */
const envSchema = z.object({
  DATABASE_URL: z
    .string()
    .regex(/^(file:|postgres(ql)?:\/\/)/, "DATABASE_URL must start with file: (SQLite) or postgres:// (PostgreSQL)")
    .default("file:./data/lapsebank.db"),
  LAPSEBANK_MAX_UPLOAD_MB: z.coerce.number().positive().max(2048).default(50),
  LAPSEBANK_SESSION_DAYS: z.coerce.number().positive().default(14),
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  PORT: z.coerce.number().int().positive().default(3000),
  /** Address `npm start` listens on; unset: 127.0.0.1 while no account exists, else every interface. */
  LAPSEBANK_HOST: z.string().trim().optional().transform((value) => value || undefined),
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
