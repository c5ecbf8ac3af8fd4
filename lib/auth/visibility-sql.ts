import { Prisma } from "../db/index.ts";
import { column, list } from "../db/dialect.ts";
import { readingViewer, type Viewer } from "./visibility.ts";

/**
 * The SQL twin of flightVisibilityWhere (lib/auth/visibility.ts) for raw queries: the same rule,
 * as a condition on the Flight table under `alias`, its values bound. Keep the two in step;
 * a test compares them on a fixture for every kind of viewer.
 */
export function visibilitySql(asked: Viewer, alias = "f"): Prisma.Sql {
  const viewer = readingViewer(asked);
  const notDeleted = Prisma.sql`${column(alias, "deletedAt")} IS NULL`;
  const visibility = column(alias, "visibility");
  switch (viewer.kind) {
    case "local":
      return notDeleted;
    case "anonymous":
      return Prisma.sql`${notDeleted} AND ${visibility} = ${"public"}`;
    case "member": {
      if (viewer.isProgramAdmin) return notDeleted;
      const shared = Prisma.sql`${visibility} IN (${"public"}, ${"program"})`;
      if (viewer.schoolIds.length === 0) return Prisma.sql`${notDeleted} AND (${shared})`;
      const own = Prisma.sql`${column(alias, "schoolId")} IN ${list(viewer.schoolIds)}`;
      return Prisma.sql`${notDeleted} AND (${shared} OR ${own})`;
    }
  }
}
