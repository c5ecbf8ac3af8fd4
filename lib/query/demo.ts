import "server-only";
import { getDb, type Db } from "../db/index.ts";
import { countDemoFlights, findDemoSchools } from "../ingest/demo-data.ts";

/** Whether the invented demo program is in the database, for the Setup page's removal control. */
export async function getDemoPresence(db: Db = getDb()): Promise<{ schools: number; flights: number }> {
  const [schools, flights] = await Promise.all([findDemoSchools(db), countDemoFlights(db)]);
  return { schools: schools.length, flights };
}
