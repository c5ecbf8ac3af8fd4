import { readingViewer, type Role, type Viewer } from "./visibility.ts";

/** Everything a person can try to do; the matrix below is the one place that decides. */
export type Action =
  | "flight.read"
  | "flight.upload"
  | "flight.edit"
  | "flight.delete"
  | "flight.restore"
  | "setup.edit"
  | "members.manage"
  | "audit.read"
  | "account.manage"
  | "program.settings";

export interface Target {
  /** The school the flight or setup item belongs to (or the school an upload goes to). */
  schoolId: string | null;
  /** For flights. */
  visibility?: string;
  deleted?: boolean;
}

const WRITERS: readonly Role[] = ["school-admin", "contributor"];

function roleIn(viewer: Extract<Viewer, { kind: "member" }>, schoolId: string | null): Role | null {
  if (!schoolId) return null;
  return viewer.memberships.find((m) => m.schoolId === schoolId)?.role ?? null;
}

/**
 * May `viewer` do `action` on `target`? Program admins may do everything; school admins manage their
 * school; contributors upload and edit their school's flights and setup; readers read. Visitors who
 * are not signed in read public flights only. API tokens are further limited to their scopes: `read`
 * reads flights, `upload` uploads, and nothing else (no audit log, no account page, no members), on
 * pages and routes alike. `account.manage` is a signed-in person's own account page and settings.
 */
export function can(asked: Viewer, action: Action, target: Target): boolean {
  if (asked.kind === "local") return true;
  // Reading follows the visibility rule exactly (a person in no school reads like a visitor).
  const viewer = action === "flight.read" ? readingViewer(asked) : asked;
  if (viewer.kind === "local") return true;
  const visible = (target.visibility === "public" || (viewer.kind === "member" && target.visibility === "program")) && !target.deleted;
  if (viewer.kind === "anonymous") return action === "flight.read" && target.visibility === "public" && !target.deleted;

  if (viewer.tokenScopes) {
    const scopeNeeded = action === "flight.read" ? "read" : action === "flight.upload" ? "upload" : null;
    if (!scopeNeeded || !viewer.tokenScopes.includes(scopeNeeded)) return false;
  }
  if (viewer.isProgramAdmin) return true;
  const role = roleIn(viewer, target.schoolId);
  switch (action) {
    case "flight.read":
      return visible || (role !== null && !target.deleted);
    case "flight.upload":
    case "flight.edit":
    case "flight.delete":
    case "setup.edit":
      return role !== null && WRITERS.includes(role);
    case "flight.restore":
    case "members.manage":
    case "audit.read":
      return role === "school-admin";
    case "account.manage":
      return true;
    case "program.settings":
      return false;
  }
}

/**
 * Schools whose audit log and deleted flights `viewer` may read: null means every school (local
 * mode, a program admin signed in), an empty list none (visitors, readers, contributors, API tokens).
 */
export function auditSchoolIds(viewer: Viewer): string[] | null {
  if (can(viewer, "audit.read", { schoolId: null })) return null;
  if (viewer.kind !== "member") return [];
  return viewer.memberships.map((m) => m.schoolId).filter((schoolId) => can(viewer, "audit.read", { schoolId }));
}

/** 401 when nobody is signed in, 403 when signed in but not allowed. */
export function refusalStatus(viewer: Viewer): 401 | 403 {
  return viewer.kind === "anonymous" ? 401 : 403;
}

export class PermissionError extends Error {
  constructor(readonly status: 401 | 403, message: string) {
    super(message);
    this.name = "PermissionError";
  }
}

/** Throws PermissionError (401/403) unless `can(viewer, action, target)`. */
export function requirePermission(viewer: Viewer, action: Action, target: Target): void {
  if (can(viewer, action, target)) return;
  const status = refusalStatus(viewer);
  throw new PermissionError(status, status === 401 ? "Sign in first." : `You may not ${action.replace(".", " ")} here.`);
}

/**
 * Throws PermissionError (401/403) unless the viewer may do `action` in at least one school (or
 * program-wide). Routes call it before reading a request body whose school they do not know yet,
 * so nobody who could never succeed makes the server read their upload.
 */
export function requirePermissionSomewhere(viewer: Viewer, action: Action): void {
  const schoolIds = viewer.kind === "member" ? viewer.memberships.map((m) => m.schoolId) : [];
  if ([null, ...schoolIds].some((schoolId) => can(viewer, action, { schoolId }))) return;
  requirePermission(viewer, action, { schoolId: null });
}
