import "server-only";

/** Climatology queries for pages and route handlers (see climatology-core.ts; climatology-cache.ts reuses results while the archive is unchanged). */
export * from "./climatology-core.ts";
export { archiveRevision, getClimatologyCached } from "./climatology-cache.ts";
