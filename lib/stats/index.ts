/** lib/stats: pure statistics for Lapsebank (summaries, intervals, tests, effect sizes). */
export * from "./types";
export * from "./random";
export * from "./distributions";
export * from "./describe";
export * from "./confidence";
export * from "./t-tests";
export * from "./mann-whitney";
export * from "./effect-size";
export * from "./power";
export * from "./claims";
