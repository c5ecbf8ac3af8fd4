import "server-only";

/** Climatology queries for pages and route handlers (see climatology-core.ts). */
export * from "./climatology-core.ts";
