/**
 * Reuses climatology results while the archive has not changed. Climatology reads every level of
 * every matching flight (the mean profiles), so on a busy shared server the same few queries would
 * otherwise be recomputed for every reader. Correct across app processes: a result is reused only
 * while the database's ArchiveRevision counter, which triggers bump inside every transaction that
 * changes flights, runs, summaries, sites or schools, still has the value read before it was
 * computed. A change that lands while a result is being computed leaves it filed under the older
 * revision, so it is never served after that change is visible.
 * Results are shared between requests: callers must not modify them.
 */
import { getDbHandle, type Db, type DbHandle } from "../db/index.ts";
import { visibilitySql } from "../auth/visibility-sql.ts";
import type { Viewer } from "../auth/visibility.ts";
import { getClimatology, type ClimatologyResult } from "./climatology-core.ts";
import type { ClimatologyQuery } from "./climatology-params.ts";

type DbLike = Pick<DbHandle, "db" | "engine" | "url">;

/** Entries kept per process (least recently used go first). */
const MAX_ENTRIES = 64;
/**
 * Flights listed across all kept results: the memory bound (a result lists each contributing
 * flight with its title and site, a few hundred bytes each, so this is some tens of megabytes).
 */
const MAX_FLIGHTS_KEPT = 50_000;

interface Entry {
  revision: number;
  result: ClimatologyResult;
  flights: number;
}

interface Cache {
  entries: Map<string, Entry>;
  flights: number;
}

const caches = new WeakMap<Db, Cache>();

/** The archive's change counter (see the archive_revision migration). */
export async function archiveRevision(db: Db): Promise<number> {
  const row = await db.archiveRevision.findUnique({ where: { id: 1 }, select: { revision: true } });
  return row?.revision ?? 0;
}

function forget(cache: Cache, key: string): void {
  const entry = cache.entries.get(key);
  if (!entry) return;
  cache.entries.delete(key);
  cache.flights -= entry.flights;
}

function listedFlights(result: ClimatologyResult): number {
  return result.groups.reduce((sum, group) => sum + group.flights.length, 0);
}

/**
 * getClimatology, answered from the cache when the same query by a viewer who sees the same
 * flights was computed at the current archive revision.
 */
export async function getClimatologyCached(viewer: Viewer, query: ClimatologyQuery, handle: DbLike = getDbHandle(), options: { profiles?: boolean } = {}): Promise<ClimatologyResult> {
  const revision = await archiveRevision(handle.db);
  // Two viewers with the same visibility condition see exactly the same flights.
  const visibility = visibilitySql(viewer);
  const key = JSON.stringify([visibility.sql, visibility.values, query, options.profiles !== false]);
  let cache = caches.get(handle.db);
  if (!cache) {
    cache = { entries: new Map(), flights: 0 };
    caches.set(handle.db, cache);
  }
  const hit = cache.entries.get(key);
  if (hit && hit.revision === revision) {
    cache.entries.delete(key);
    cache.entries.set(key, hit); // most recently used last
    return hit.result;
  }
  const result = await getClimatology(viewer, query, handle, options);
  const flights = listedFlights(result);
  forget(cache, key);
  if (flights <= MAX_FLIGHTS_KEPT) {
    cache.entries.set(key, { revision, result, flights });
    cache.flights += flights;
    while (cache.entries.size > MAX_ENTRIES || cache.flights > MAX_FLIGHTS_KEPT) forget(cache, cache.entries.keys().next().value as string);
  }
  return result;
}
