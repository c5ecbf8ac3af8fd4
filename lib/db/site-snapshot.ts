/** The site values an analysis used (latitude, longitude, elevation, IANA time zone); each run records them. */
export interface SiteSnapshot {
  latitudeDeg: number;
  longitudeDeg: number;
  elevationM: number;
  timeZone: string;
}

/** A run's record of its site (AnalysisRun columns; nullable in the schema, filled for every run). */
export interface RunSiteSnapshot {
  siteLatitudeDeg: number | null;
  siteLongitudeDeg: number | null;
  siteElevationM: number | null;
  siteTimeZone: string | null;
}

/**
 * Whether a run was analysed with exactly these site values: the one rule for "the site was corrected
 * since" (re-analysis, Setup and the flight page). An unrecorded snapshot never matches.
 */
export function runUsedSite(run: RunSiteSnapshot, site: SiteSnapshot): boolean {
  return run.siteLatitudeDeg === site.latitudeDeg && run.siteLongitudeDeg === site.longitudeDeg && run.siteElevationM === site.elevationM && run.siteTimeZone === site.timeZone;
}
