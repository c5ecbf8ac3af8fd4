/** Claim checks (re-exported for lib/stats/index.ts). */
export * from "./claim-check";
