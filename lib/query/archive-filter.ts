import { z } from "zod";
import type { Prisma } from "../db/index.ts";
import { flightVisibilityWhere, type Viewer } from "../auth/visibility.ts";
import { strictQueryObject } from "./strict-params.ts";

const blankToUndefined = (v: unknown) => (v === "" || v === null ? undefined : v);

/**
 * Archive list filter, shared by the Archive page (URL search params) and GET /api/v1/flights.
 * Strict: an unknown parameter is refused by name rather than ignored.
 */
export const archiveFilterSchema = strictQueryObject({
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

/**
 * The Archive filter as a Prisma condition on flights, visibility included. The one definition,
 * used by the Archive list (lib/query/flights.ts) and by Archive exports (lib/export/read.ts).
 */
export function archiveFlightWhere(viewer: Viewer, filter: Pick<ArchiveFilter, "school" | "site" | "from" | "to" | "season">): Prisma.FlightWhereInput {
  const and: Prisma.FlightWhereInput[] = [flightVisibilityWhere(viewer)];
  if (filter.school) and.push({ schoolId: filter.school });
  if (filter.site) and.push({ siteId: filter.site });
  if (filter.from) and.push({ launchAtUtc: { gte: filter.from } });
  if (filter.to) and.push({ launchAtUtc: { lt: new Date(filter.to.getTime() + 86_400_000) } });
  if (filter.season) {
    const bySeason = ["DJF", "MAM", "JJA", "SON"].includes(filter.season) ? { season: filter.season } : { seasonName: filter.season };
    and.push({ summaries: { some: { isCurrent: true, ...bySeason } } });
  }
  return { AND: and };
}
