import { z } from "zod";

export type SearchParams = Promise<Record<string, string | string[] | undefined>>;

const idParam = z.preprocess((v) => (Array.isArray(v) ? v[0] : v), z.string().trim().min(1).max(64).optional().catch(undefined));

/** The `?school=` filter of the Setup lists. */
export async function schoolFilter(searchParams: SearchParams): Promise<string | undefined> {
  return idParam.parse((await searchParams).school);
}

export function pickId(value: string | string[] | undefined): string | undefined {
  return idParam.parse(value);
}
