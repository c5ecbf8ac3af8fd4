import { describe, expect, test } from "vitest";
import { PermissionError, requirePermissionSomewhere, type Action } from "@/lib/auth/permissions";
import type { Role, Viewer } from "@/lib/auth/visibility";

const member = (role: Role, extra: Partial<Extract<Viewer, { kind: "member" }>> = {}): Viewer => ({ kind: "member", userId: "u", isProgramAdmin: false, schoolIds: ["A"], memberships: [{ schoolId: "A", role }], ...extra });

// Checked before a body is read, so it must agree with `can` on the school the body names later.
describe("may the viewer do this in some school?", () => {
  test.each<[string, Viewer, Action, 200 | 401 | 403]>([
    ["local mode", { kind: "local" }, "flight.upload", 200],
    ["visitor", { kind: "anonymous" }, "flight.upload", 401],
    ["reader", member("reader"), "flight.upload", 403],
    ["contributor", member("contributor"), "flight.upload", 200],
    ["contributor, setup", member("contributor"), "setup.edit", 200],
    ["reader, setup", member("reader"), "setup.edit", 403],
    ["in no school", member("reader", { schoolIds: [], memberships: [] }), "flight.upload", 403],
    ["program admin in no school", member("reader", { isProgramAdmin: true, schoolIds: [], memberships: [] }), "setup.edit", 200],
    ["upload token", member("contributor", { tokenScopes: ["upload"] }), "flight.upload", 200],
    ["read-only token", member("contributor", { tokenScopes: ["read"] }), "flight.upload", 403],
    ["token, setup", member("school-admin", { tokenScopes: ["read", "upload"] }), "setup.edit", 403],
  ])("%s: %s → %i", (_who, viewer, action, expected) => {
    let status = 200;
    try {
      requirePermissionSomewhere(viewer, action);
    } catch (error) {
      if (!(error instanceof PermissionError)) throw error;
      status = error.status;
    }
    expect(status).toBe(expected);
  });
});
