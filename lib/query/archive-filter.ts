import { z } from "zod";

const blankToUndefined = (v: unknown) => (v === "" || v === null ? undefined : v);

/** Archive list filter, shared by the Archive page (URL search params) and GET /api/v1/flights. */
export const archiveFilterSchema = z.object({
  school: z.preprocess(blankToUndefined, z.string().max(64).optional()),
  site: z.preprocess(blankToUndefined, z.string().max(64).optional()),
  from: z.preprocess(blankToUndefined, z.coerce.date({ error: "from must be a date (YYYY-MM-DD)" }).optional()),
  to: z.preprocess(blankToUndefined, z.coerce.date({ error: "to must be a date (YYYY-MM-DD)" }).optional()),
  season: z.preprocess(blankToUndefined, z.enum(["DJF", "MAM", "JJA", "SON", "winter", "spring", "summer", "autumn"]).optional()),
  sort: z.enum(["launch-desc", "launch-asc", "tropopause-desc", "tropopause-asc", "lapse-desc", "lapse-asc", "title"]).default("launch-desc"),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(25),
});

export type ArchiveFilter = z.infer<typeof archiveFilterSchema>;

/** Turns URLSearchParams or a Next.js searchParams object into a plain record for zod. */
export function searchParamsToRecord(params: URLSearchParams | Record<string, string | string[] | undefined>): Record<string, string> {
  const out: Record<string, string> = {};
  if (params instanceof URLSearchParams) {
    params.forEach((value, key) => (out[key] = value));
  } else {
    for (const [key, value] of Object.entries(params)) {
      if (typeof value === "string") out[key] = value;
      else if (Array.isArray(value) && value[0] !== undefined) out[key] = value[0];
    }
  }
  return out;
}
