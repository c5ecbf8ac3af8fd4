import { readingViewer, type Viewer } from "./visibility.ts";

/** A condition with "?" placeholders and the values they bind, in order. */
export interface VisibilitySql {
  readonly text: string;
  readonly values: readonly unknown[];
}

/**
 * The SQL twin of flightVisibilityWhere (lib/auth/visibility.ts) for raw queries: the same rule,
 * as a condition on the Flight table under `alias`, with "?" placeholders. Keep the two in step;
 * a test compares them on a fixture for every kind of viewer.
 */
export function visibilitySql(asked: Viewer, alias = "f"): VisibilitySql {
  const viewer = readingViewer(asked);
  if (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(alias)) throw new Error(`invalid SQL alias ${alias}`);
  const notDeleted = `${alias}."deletedAt" IS NULL`;
  switch (viewer.kind) {
    case "local":
      return { text: notDeleted, values: [] };
    case "anonymous":
      return { text: `${notDeleted} AND ${alias}."visibility" = ?`, values: ["public"] };
    case "member": {
      if (viewer.isProgramAdmin) return { text: notDeleted, values: [] };
      const shared = `${alias}."visibility" IN (?, ?)`;
      if (viewer.schoolIds.length === 0) return { text: `${notDeleted} AND (${shared})`, values: ["public", "program"] };
      const own = `${alias}."schoolId" IN (${viewer.schoolIds.map(() => "?").join(", ")})`;
      return { text: `${notDeleted} AND (${shared} OR ${own})`, values: ["public", "program", ...viewer.schoolIds] };
    }
  }
}
