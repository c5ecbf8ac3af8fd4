/** Deleting a setup item entered by mistake, of any kind, refused while anything uses it. */
import type { Actor } from "../store.ts";
import { audit, SETUP_ACTOR, SetupConflictError, type DbLike } from "./common.ts";

// --- deleting setup items -----------------------------------------------------------------------

export const SETUP_ITEM_KINDS = ["site", "payload", "sensor", "calibration", "layout"] as const;
export type SetupItemKind = (typeof SETUP_ITEM_KINDS)[number];

function countWords(count: number, one: string, many: string): string {
  return `${count} ${count === 1 ? one : many}`;
}

export interface SetupItemFacts {
  schoolId: string;
  name: string;
  /** A calibration's sensor (its page lives under the sensor's). */
  sensorId?: string;
}

/** The item's school and display name, or null when it does not exist. */
export async function findSetupItem(db: DbLike, kind: SetupItemKind, id: string): Promise<SetupItemFacts | null> {
  switch (kind) {
    case "site": {
      const site = await db.site.findUnique({ where: { id }, select: { schoolId: true, name: true } });
      return site && { schoolId: site.schoolId, name: site.name };
    }
    case "payload": {
      const payload = await db.payload.findUnique({ where: { id }, select: { schoolId: true, name: true } });
      return payload && { schoolId: payload.schoolId, name: payload.name };
    }
    case "sensor": {
      const sensor = await db.sensor.findUnique({ where: { id }, select: { schoolId: true, serial: true } });
      return sensor && { schoolId: sensor.schoolId, name: sensor.serial };
    }
    case "calibration": {
      const calibration = await db.calibration.findUnique({ where: { id }, select: { id: true, sensorId: true, sensor: { select: { schoolId: true, serial: true } } } });
      return calibration && { schoolId: calibration.sensor.schoolId, name: `${calibration.id} (sensor ${calibration.sensor.serial})`, sensorId: calibration.sensorId };
    }
    case "layout": {
      const layout = await db.loggerLayout.findUnique({ where: { id }, select: { schoolId: true, name: true } });
      return layout && { schoolId: layout.schoolId, name: layout.name };
    }
  }
}

/** What refers to a setup item, in words ("3 flights"); empty when nothing does. */
export async function setupItemUses(db: DbLike, kind: SetupItemKind, id: string): Promise<string[]> {
  const uses: string[] = [];
  const flights = (n: number) => n && uses.push(countWords(n, "flight", "flights"));
  const runs = (n: number) => n && uses.push(countWords(n, "analysis run", "analysis runs"));
  switch (kind) {
    case "site":
      flights(await db.flight.count({ where: { siteId: id } }));
      break;
    case "payload":
      flights(await db.flight.count({ where: { payloadId: id } }));
      break;
    case "sensor":
      flights(await db.flight.count({ where: { sensorId: id } }));
      runs(await db.analysisRun.count({ where: { calibration: { sensorId: id } } }));
      break;
    case "calibration":
      runs(await db.analysisRun.count({ where: { calibrationId: id } }));
      break;
    case "layout":
      flights(await db.flight.count({ where: { layoutId: id } }));
      break;
  }
  return uses;
}

/**
 * Deletes a setup item entered by mistake. Flights and analysis runs keep pointing at the setup
 * they were made with (provenance), so an item anything refers to is refused, saying what uses it;
 * such an item can be corrected instead. Deleting a sensor also deletes its calibrations and mount
 * history; deleting a payload, its mount history. Call inside a transaction.
 * @throws SetupConflictError when the item does not exist or is in use.
 */
export async function deleteSetupItem(db: DbLike, kind: SetupItemKind, id: string, actor: Actor = SETUP_ACTOR): Promise<SetupItemFacts> {
  const item = await findSetupItem(db, kind, id);
  if (!item) throw new SetupConflictError(`That ${kind} no longer exists`);
  const uses = await setupItemUses(db, kind, id);
  if (uses.length) {
    throw new SetupConflictError(`${kind[0]?.toUpperCase()}${kind.slice(1)} ${item.name} is used by ${uses.join(" and ")}, so it cannot be deleted; correct it instead.`);
  }
  switch (kind) {
    case "site":
      await db.site.delete({ where: { id } });
      break;
    case "payload":
      await db.payload.delete({ where: { id } });
      break;
    case "sensor":
      await db.sensor.delete({ where: { id } });
      break;
    case "calibration":
      await db.calibration.delete({ where: { id } });
      break;
    case "layout":
      await db.loggerLayout.delete({ where: { id } });
      break;
  }
  await audit(db, actor, item.schoolId, `${kind}.delete`, kind, id, { name: item.name });
  return item;
}
