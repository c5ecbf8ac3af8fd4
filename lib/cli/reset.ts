import type { Db } from "../db/index.ts";

/** Deletes every row, children before parents, and any interrupted-restore marker (used by `reset`, `demo` and tests; never by the web app). */
export async function resetDatabase(db: Db): Promise<void> {
  await db.$transaction([
    db.auditEvent.deleteMany(), db.flightSummary.deleteMany(), db.layerStat.deleteMany(), db.profileLevel.deleteMany(),
    db.analysisRun.deleteMany(), db.flight.deleteMany(), db.rawFile.deleteMany(), db.calibration.deleteMany(),
    db.sensorMount.deleteMany(), db.sensor.deleteMany(), db.payload.deleteMany(), db.loggerLayout.deleteMany(), db.site.deleteMany(),
    db.apiToken.deleteMany(), db.invitation.deleteMany(), db.membership.deleteMany(), db.session.deleteMany(), db.loginThrottle.deleteMany(), db.signInAddress.deleteMany(),
    db.user.deleteMany(), db.school.deleteMany(), db.programSettings.deleteMany(), db.restoreMarker.deleteMany(),
  ]);
}
