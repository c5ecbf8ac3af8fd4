import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { acceptInvitation, createInvitation, createUser, describeInvitation, invitationUrl, isInvitationOnly } from "../../lib/auth/accounts.ts";
import { publicOrigin, parseTrustedProxy } from "../../lib/auth/trusted-proxy.ts";
import { setInvitationOnly } from "../../lib/ingest/setup-more.ts";
import { getProgramSettings } from "../../lib/ingest/setup-reads.ts";
import { setUpSchool } from "../support/flight-files.ts";
import { createTestDatabase, testEngines, type TestDatabase } from "../support/test-databases.ts";

const password = "correct horse battery";

describe.each(testEngines())("invitations and the invitation-only rule on %s", (engine) => {
  let database: TestDatabase;
  let school: Awaited<ReturnType<typeof setUpSchool>>;

  beforeAll(async () => {
    database = await createTestDatabase(engine);
    school = await setUpSchool(database.db, "Invited School");
  });
  afterAll(async () => database?.drop());

  test("the link is absolute on the configured public URL", () => {
    const origin = publicOrigin({ requestUrl: "http://localhost:3000/schools/x/members", headers: new Headers(), publicUrl: "https://archive.example.org/some/path", proxy: parseTrustedProxy(undefined) });
    // Issue 16: before, the link was the bare path /invite/<secret>.
    expect(invitationUrl(origin, "abc_DEF-123")).toBe("https://archive.example.org/invite/abc_DEF-123");
  });

  test("invitation-only: the first account is still allowed, then plain sign-up is refused", async () => {
    expect(await isInvitationOnly(database.db)).toBe(false);
    await setInvitationOnly(database.db, true);
    expect(await isInvitationOnly(database.db)).toBe(true);
    // Storing the rule alone leaves the analysis parameters at their built-in defaults.
    expect((await getProgramSettings(database.db)).isDefault).toBe(true);
    expect((await getProgramSettings(database.db)).invitationOnly).toBe(true);
    const first = await createUser(database.db, { email: "admin@example.org", password, displayName: "Admin" });
    expect(first.isProgramAdmin).toBe(true);
    // Issue 16: before, anyone could sign up.
    await expect(createUser(database.db, { email: "walk-in@example.org", password, displayName: "Walk-in" })).rejects.toMatchObject({ code: "invitation-required" });
    expect(await database.db.user.count({ where: { email: "walk-in@example.org" } })).toBe(0);
  });

  test("a valid invitation lets a new person sign up and join; the page data names school and role", async () => {
    const admin = await database.db.user.findUniqueOrThrow({ where: { email: "admin@example.org" } });
    const invitation = await createInvitation(database.db, { schoolId: school.school.id, role: "contributor", createdById: admin.id });
    expect(await describeInvitation(database.db, invitation.secret)).toMatchObject({ schoolName: "Invited School", role: "contributor", state: "open" });
    const invited = await createUser(database.db, { email: "invited@example.org", password, displayName: "Invited" }, { invitationSecret: invitation.secret });
    expect(invited.joined).toEqual({ schoolId: school.school.id, role: "contributor" });
    expect(await database.db.membership.findFirst({ where: { userId: invited.id, schoolId: school.school.id } })).toMatchObject({ role: "contributor" });
    // Used now: the page shows no Accept, and the same link admits nobody else.
    expect((await describeInvitation(database.db, invitation.secret))?.state).toBe("used");
    await expect(createUser(database.db, { email: "second@example.org", password, displayName: "Second" }, { invitationSecret: invitation.secret })).rejects.toMatchObject({ code: "invalid-invitation" });
    expect(await database.db.user.count({ where: { email: "second@example.org" } })).toBe(0);
  });

  test("an expired invitation is described as expired and admits nobody", async () => {
    const invitation = await createInvitation(database.db, { schoolId: school.school.id, role: "reader", createdById: null });
    await database.db.invitation.update({ where: { id: invitation.id }, data: { expiresAt: new Date(Date.now() - 60_000) } });
    expect(await describeInvitation(database.db, invitation.secret)).toMatchObject({ schoolName: "Invited School", role: "reader", state: "expired" });
    await expect(createUser(database.db, { email: "late@example.org", password, displayName: "Late" }, { invitationSecret: invitation.secret })).rejects.toMatchObject({ code: "invalid-invitation" });
    const someone = await database.db.user.findUniqueOrThrow({ where: { email: "invited@example.org" } });
    await expect(acceptInvitation(database.db, invitation.secret, someone.id)).rejects.toMatchObject({ code: "invalid-invitation" });
    expect(await describeInvitation(database.db, "no-such-secret")).toBeNull();
  });

  test("turning the rule off lets anyone sign up again", async () => {
    await setInvitationOnly(database.db, false);
    const walkIn = await createUser(database.db, { email: "walk-in@example.org", password, displayName: "Walk-in" });
    expect(walkIn.isProgramAdmin).toBe(false);
    expect(walkIn.joined).toBeNull();
  });
});
