import { createHash, randomBytes, timingSafeEqual } from "node:crypto";
import { hash as argon2Hash, verify as argon2Verify } from "@node-rs/argon2";
import { z } from "zod";
import { Prisma, type Db } from "../db/index.ts";
import { getEnv } from "../env.ts";
import { ACCOUNT_RULE, ADDRESS_RULE, clearFailures, pruneThrottles, refundCheck, reserveCheck } from "./login-throttle.ts";
import type { Role, TokenScope, Viewer } from "./visibility.ts";

export const SESSION_COOKIE = "lapsebank_session";
const INVITATION_DAYS = 7;

export const emailSchema = z.string().trim().toLowerCase().email("Enter a valid email address").max(200);
export const passwordSchema = z.string().min(10, "Use at least 10 characters").max(200);
export const signUpSchema = z.object({ email: emailSchema, password: passwordSchema, displayName: z.string().trim().min(1, "Enter your name").max(120) });
export const signInSchema = z.object({ email: emailSchema, password: z.string().min(1, "Enter your password").max(200) });
export const roleSchema = z.enum(["school-admin", "contributor", "reader"]);
export const tokenScopeSchema = z.enum(["read", "upload"]);

export function sha256(text: string): string {
  return createHash("sha256").update(text).digest("hex");
}

function secret(bytes = 32): string {
  return randomBytes(bytes).toString("base64url");
}

/** argon2id with the library's defaults (OWASP-recommended memory and passes). */
export function hashPassword(password: string): Promise<string> {
  return argon2Hash(password);
}

export async function countUsers(db: Db): Promise<number> {
  return db.user.count();
}

export class AccountError extends Error {
  constructor(readonly code: "email-taken" | "bad-credentials" | "rate-limited" | "invalid-invitation" | "not-found" | "already-member" | "weak-password" | "invitation-required", message: string, readonly retryAfterS?: number) {
    super(message);
    this.name = "AccountError";
  }
}

/** Whether the program accepts new accounts only through a valid invitation link. */
export async function isInvitationOnly(db: Pick<Db, "programSettings">): Promise<boolean> {
  const row = await db.programSettings.findUnique({ where: { id: 1 }, select: { invitationOnly: true } });
  return row?.invitationOnly === true;
}

/**
 * Creates a user; the very first account becomes program admin. With `invitationSecret` the new
 * person also joins that invitation's school in the same transaction (the link is then used).
 * When the program is invitation-only, every account after the first needs a valid invitation:
 * without one the sign-up is refused with AccountError("invitation-required").
 */
export async function createUser(db: Db, input: z.input<typeof signUpSchema>, options: { programAdmin?: boolean; invitationSecret?: string } = {}) {
  const data = signUpSchema.parse(input);
  const existing = await db.user.findUnique({ where: { email: data.email } });
  if (existing) throw new AccountError("email-taken", "An account with this email already exists; sign in instead.");
  const passwordHash = await hashPassword(data.password);
  return db.$transaction(async (tx) => {
    const isFirst = (await tx.user.count()) === 0;
    if (!isFirst && !options.invitationSecret && (await isInvitationOnly(tx))) {
      throw new AccountError("invitation-required", "This program accepts new accounts by invitation only. Ask a school admin for an invitation link and open it to sign up.");
    }
    const user = await tx.user.create({ data: { email: data.email, displayName: data.displayName, passwordHash, isProgramAdmin: isFirst || options.programAdmin === true } });
    await tx.auditEvent.create({ data: { actorUserId: user.id, actorLabel: data.email, action: "user.create", entityType: "user", entityId: user.id, details: { programAdmin: user.isProgramAdmin } } });
    const joined = options.invitationSecret ? await useInvitation(tx, options.invitationSecret, user.id) : null;
    return { id: user.id, email: user.email, displayName: user.displayName, isProgramAdmin: user.isProgramAdmin, joined };
  });
}

/** How long a successful sign-in makes its address "known" for that person (see signIn). */
const KNOWN_ADDRESS_DAYS = 90;

function rateLimited(retryAfterMs: number, whose: "account" | "address"): AccountError {
  const seconds = Math.max(1, Math.ceil(retryAfterMs / 1000));
  const wait = seconds < 120 ? `${seconds} seconds` : `${Math.ceil(seconds / 60)} minutes`;
  const message = whose === "account"
    ? `Too many failed sign-in attempts for this account. Wait ${wait}, then try again.`
    : `Too many failed sign-in attempts from your network. Wait ${wait}, then try again.`;
  return new AccountError("rate-limited", message, seconds);
}

async function isKnownAddress(db: Db, email: string, address: string): Promise<boolean> {
  const user = await db.user.findUnique({ where: { email }, select: { id: true } });
  if (!user) return false;
  const known = await db.signInAddress.findUnique({ where: { userId_address: { userId: user.id, address } } });
  return known !== null && Date.now() - known.lastSignInAt.getTime() < KNOWN_ADDRESS_DAYS * 86_400_000;
}

async function rememberAddress(db: Db, userId: string, address: string): Promise<void> {
  try {
    await db.signInAddress.upsert({ where: { userId_address: { userId, address } }, create: { userId, address }, update: { lastSignInAt: new Date() } });
  } catch (error) {
    // Two sign-ins of one person from one address at once: the other one wrote the row.
    if (!(error instanceof Prisma.PrismaClientKnownRequestError && error.code === "P2002")) throw error;
  }
}

/**
 * Checks email and password. Limits live in the database (every app process shares them) and are
 * claimed before the password is checked, so concurrent tries cannot exceed them:
 * - per account: 5 free tries, then a doubling wait (15 s … 5 min) before each further check; a
 *   correct password after the wait signs in and clears the count (the owner is slowed, never locked out);
 * - per client address: 20 free tries across all accounts, then the same doubling wait;
 * - from an address where the person signed in successfully before (within 90 days) the address's
 *   limit does not apply and the account's limit counts separately for that address: guessing
 *   from elsewhere, or on other accounts from the same address, does not make the owner wait there.
 * `address` comes from the trusted-proxy rule (app/_lib/viewer.ts getClientAddress).
 * Returns a new session secret for the cookie; the session lasts `sessionDays` (default
 * LAPSEBANK_SESSION_DAYS, 14 when unset).
 */
export async function signIn(db: Db, input: z.input<typeof signInSchema>, address: string, options: { sessionDays?: number } = {}): Promise<{ sessionSecret: string; userId: string; expiresAt: Date }> {
  const data = signInSchema.parse(input);
  const known = await isKnownAddress(db, data.email, address);
  // From an address the person used before, the account's tries have a bucket of their own, so
  // guessing from elsewhere cannot keep its owner waiting there.
  const accountKey = known ? `account:${data.email}|from:${address}` : `account:${data.email}`;
  const addressKey = `address:${address}`;
  const addressThrottled = !known;
  if (addressThrottled) {
    const byAddress = await reserveCheck(db, addressKey, ADDRESS_RULE);
    if (!byAddress.ok) throw rateLimited(byAddress.retryAfterMs, "address");
  }
  const byAccount = await reserveCheck(db, accountKey, ACCOUNT_RULE);
  if (!byAccount.ok) {
    if (addressThrottled) await refundCheck(db, addressKey);
    throw rateLimited(byAccount.retryAfterMs, "account");
  }
  const user = await db.user.findUnique({ where: { email: data.email } });
  // Verify against a dummy hash when the account does not exist, so timing does not reveal it.
  const ok = user ? await argon2Verify(user.passwordHash, data.password) : (await argon2Verify(await dummyHash(), data.password), false);
  if (!user || !ok) throw new AccountError("bad-credentials", "Email or password is wrong.");
  await clearFailures(db, accountKey);
  if (addressThrottled) await refundCheck(db, addressKey);
  await rememberAddress(db, user.id, address);
  await pruneThrottles(db);
  const sessionSecret = secret();
  const sessionDays = options.sessionDays ?? getEnv().LAPSEBANK_SESSION_DAYS;
  const expiresAt = new Date(Date.now() + sessionDays * 86_400_000);
  await db.session.create({ data: { id: sha256(sessionSecret), userId: user.id, expiresAt } });
  return { sessionSecret, userId: user.id, expiresAt };
}

let dummy: Promise<string> | null = null;
function dummyHash(): Promise<string> {
  dummy ??= hashPassword(secret());
  return dummy;
}

export async function signOut(db: Db, sessionSecret: string): Promise<void> {
  await db.session.deleteMany({ where: { id: sha256(sessionSecret) } });
}

/**
 * Changes a password after checking the current one, and signs out every other session of the
 * person (a thief's cookie stops working); the session making the change, if given, stays.
 */
export async function changePassword(db: Db, userId: string, currentPassword: string, newPassword: string, options: { keepSessionSecret?: string } = {}): Promise<{ sessionsEnded: number }> {
  const user = await db.user.findUnique({ where: { id: userId } });
  if (!user || !(await argon2Verify(user.passwordHash, currentPassword))) throw new AccountError("bad-credentials", "The current password is wrong.");
  const parsed = passwordSchema.safeParse(newPassword);
  if (!parsed.success) throw new AccountError("weak-password", parsed.error.issues[0]?.message ?? "Choose a longer password");
  const passwordHash = await hashPassword(parsed.data);
  const keep = options.keepSessionSecret ? sha256(options.keepSessionSecret) : null;
  return db.$transaction(async (tx) => {
    await tx.user.update({ where: { id: userId }, data: { passwordHash } });
    const ended = await tx.session.deleteMany({ where: { userId, ...(keep ? { id: { not: keep } } : {}) } });
    await tx.auditEvent.create({ data: { actorUserId: userId, actorLabel: user.email, action: "user.password-change", entityType: "user", entityId: userId, details: { otherSessionsEnded: ended.count } } });
    return { sessionsEnded: ended.count };
  });
}

async function memberViewer(db: Db, userId: string, extra: { schoolId?: string; scopes?: TokenScope[] } = {}): Promise<Viewer | null> {
  const user = await db.user.findUnique({ where: { id: userId }, include: { memberships: true } });
  if (!user) return null;
  let memberships = user.memberships.map((m) => ({ schoolId: m.schoolId, role: m.role as Role }));
  if (extra.schoolId) {
    memberships = memberships.filter((m) => m.schoolId === extra.schoolId);
    // A program admin's token acts as a school admin of its one school, nothing wider.
    if (memberships.length === 0 && user.isProgramAdmin) memberships = [{ schoolId: extra.schoolId, role: "school-admin" }];
  }
  return {
    kind: "member",
    userId: user.id,
    email: user.email,
    displayName: user.displayName,
    // A token acts for one school: program-admin powers don't travel with it.
    isProgramAdmin: extra.scopes ? false : user.isProgramAdmin,
    schoolIds: memberships.map((m) => m.schoolId),
    memberships,
    ...(extra.scopes ? { tokenScopes: extra.scopes } : {}),
  };
}

/** The viewer behind a session cookie, or null when it is missing, unknown or expired. */
export async function viewerFromSession(db: Db, sessionSecret: string | undefined): Promise<Viewer | null> {
  if (!sessionSecret) return null;
  const session = await db.session.findUnique({ where: { id: sha256(sessionSecret) } });
  if (!session || session.expiresAt < new Date()) return null;
  if (Date.now() - session.lastSeenAt.getTime() > 3_600_000) {
    await db.session.update({ where: { id: session.id }, data: { lastSeenAt: new Date() } }).catch(() => undefined);
  }
  return memberViewer(db, session.userId);
}

/** Token format: `lbk_<random>`; only its sha256 is stored. */
export async function createApiToken(db: Db, input: { userId: string; schoolId: string; name: string; scopes: TokenScope[] }): Promise<{ id: string; token: string }> {
  const membership = await db.membership.findUnique({ where: { userId_schoolId: { userId: input.userId, schoolId: input.schoolId } } });
  const user = await db.user.findUnique({ where: { id: input.userId } });
  if (!membership && !user?.isProgramAdmin) throw new AccountError("not-found", "You can only make tokens for a school you belong to.");
  const token = `lbk_${secret()}`;
  const row = await db.apiToken.create({ data: { userId: input.userId, schoolId: input.schoolId, name: input.name.trim().slice(0, 80) || "token", tokenHash: sha256(token), scopes: [...new Set(input.scopes)].join(",") } });
  await db.auditEvent.create({ data: { actorUserId: input.userId, actorLabel: user?.email ?? "", schoolId: input.schoolId, action: "token.create", entityType: "api-token", entityId: row.id, details: { scopes: row.scopes, name: row.name } } });
  return { id: row.id, token };
}

export async function revokeApiToken(db: Db, tokenId: string, byUserId: string): Promise<void> {
  const row = await db.apiToken.findUnique({ where: { id: tokenId } });
  if (!row || row.userId !== byUserId) throw new AccountError("not-found", "No such token.");
  await db.apiToken.update({ where: { id: tokenId }, data: { revokedAt: new Date() } });
  await db.auditEvent.create({ data: { actorUserId: byUserId, schoolId: row.schoolId, action: "token.revoke", entityType: "api-token", entityId: tokenId } });
}

/** The viewer behind `Authorization: Bearer lbk_...`; null when unknown or revoked. */
export async function viewerFromToken(db: Db, token: string): Promise<Viewer | null> {
  const row = await db.apiToken.findUnique({ where: { tokenHash: sha256(token) } });
  if (!row || row.revokedAt) return null;
  const expected = Buffer.from(row.tokenHash, "hex");
  if (!timingSafeEqual(expected, Buffer.from(sha256(token), "hex"))) return null;
  // "Last used" to the minute is plenty, and spares a write on every scripted request.
  if (!row.lastUsedAt || Date.now() - row.lastUsedAt.getTime() > 60_000) {
    await db.apiToken.update({ where: { id: row.id }, data: { lastUsedAt: new Date() } });
  }
  const scopes = row.scopes.split(",").filter((s): s is TokenScope => s === "read" || s === "upload");
  return memberViewer(db, row.userId, { schoolId: row.schoolId, scopes });
}

/** A one-time invitation link secret (shown once; stored hashed; expires). */
export async function createInvitation(db: Db, input: { schoolId: string; role: Role; createdById: string | null }): Promise<{ id: string; secret: string; expiresAt: Date }> {
  const invitationSecret = secret(24);
  const expiresAt = new Date(Date.now() + INVITATION_DAYS * 86_400_000);
  const row = await db.invitation.create({ data: { schoolId: input.schoolId, role: input.role, tokenHash: sha256(invitationSecret), createdById: input.createdById, expiresAt } });
  await db.auditEvent.create({ data: { actorUserId: input.createdById, schoolId: input.schoolId, action: "invitation.create", entityType: "invitation", entityId: row.id, details: { role: input.role } } });
  return { id: row.id, secret: invitationSecret, expiresAt };
}

const ROLE_RANK: Record<Role, number> = { reader: 1, contributor: 2, "school-admin": 3 };

/**
 * Accepts an invitation for a signed-in user: adds their membership, or raises their role to the
 * invitation's; an invitation never lowers a role (a school admin opening a reader link stays admin).
 * The link then stops working. Returns the role the person has afterwards.
 */
export async function acceptInvitation(db: Db, invitationSecret: string, userId: string): Promise<{ schoolId: string; role: Role }> {
  return db.$transaction((tx) => useInvitation(tx, invitationSecret, userId));
}

type Tx = Parameters<Parameters<Db["$transaction"]>[0]>[0];

/** Marks an invitation used and applies its role to the user, inside the caller's transaction. */
async function useInvitation(tx: Tx, invitationSecret: string, userId: string): Promise<{ schoolId: string; role: Role }> {
  const invitation = await tx.invitation.findUnique({ where: { tokenHash: sha256(invitationSecret) } });
  if (!invitation || invitation.usedAt || invitation.expiresAt < new Date()) throw new AccountError("invalid-invitation", "This invitation link has expired or was already used. Ask for a new one.");
  const invited = roleSchema.parse(invitation.role);
  const used = await tx.invitation.updateMany({ where: { id: invitation.id, usedAt: null }, data: { usedAt: new Date() } });
  if (used.count !== 1) throw new AccountError("invalid-invitation", "This invitation link was already used.");
  const existing = await tx.membership.findUnique({ where: { userId_schoolId: { userId, schoolId: invitation.schoolId } } });
  const current = existing ? roleSchema.safeParse(existing.role) : null;
  let role: Role = invited;
  if (!existing) {
    await tx.membership.create({ data: { userId, schoolId: invitation.schoolId, role: invited } });
  } else if (current?.success && ROLE_RANK[current.data] >= ROLE_RANK[invited]) {
    role = current.data;
  } else {
    await tx.membership.update({ where: { id: existing.id }, data: { role: invited } });
  }
  await tx.auditEvent.create({ data: { actorUserId: userId, schoolId: invitation.schoolId, action: "membership.join", entityType: "membership", entityId: `${userId}:${invitation.schoolId}`, details: { invitedRole: invited, role, previousRole: existing?.role ?? null } } });
  return { schoolId: invitation.schoolId, role };
}

export type InvitationState = "open" | "used" | "expired";

/**
 * What an invitation page shows: the school and role the link offers and whether it can still be
 * accepted; null for a secret that matches no invitation. Only the secret's hash is looked up.
 */
export async function describeInvitation(db: Db, invitationSecret: string, now: Date = new Date()): Promise<{ schoolName: string; role: Role; expiresAt: Date; state: InvitationState } | null> {
  const row = await db.invitation.findUnique({ where: { tokenHash: sha256(invitationSecret) }, include: { school: { select: { name: true } } } });
  if (!row) return null;
  const role = roleSchema.safeParse(row.role);
  if (!role.success) return null;
  const state: InvitationState = row.usedAt ? "used" : row.expiresAt < now ? "expired" : "open";
  return { schoolName: row.school.name, role: role.data, expiresAt: row.expiresAt, state };
}

/** The absolute link of an invitation, on the given public origin (see trusted-proxy.ts publicOrigin). */
export function invitationUrl(origin: string, invitationSecret: string): string {
  return new URL(`/invite/${encodeURIComponent(invitationSecret)}`, origin).toString();
}

/**
 * Changes the role of an existing member, or removes them (`role: null`). People join only by
 * invitation (or `addMembership` from trusted set-up code), so an unknown user or a user who is
 * not a member of the school is refused with AccountError("not-found").
 */
export async function setMembershipRole(db: Db, input: { userId: string; schoolId: string; role: Role | null; byUserId: string | null }): Promise<void> {
  const changed = input.role === null
    ? await db.membership.deleteMany({ where: { userId: input.userId, schoolId: input.schoolId } })
    : await db.membership.updateMany({ where: { userId: input.userId, schoolId: input.schoolId }, data: { role: input.role } });
  if (changed.count === 0) throw new AccountError("not-found", "That person is not a member of this school; invite them with a link instead.");
  await db.auditEvent.create({ data: { actorUserId: input.byUserId, schoolId: input.schoolId, action: "membership.role", entityType: "membership", entityId: `${input.userId}:${input.schoolId}`, details: { role: input.role } } });
}

/**
 * Adds a member directly, without an invitation: for trusted set-up code (the CLI, tests), never a
 * web form. Refuses an unknown user or school, and an existing membership (change it with setMembershipRole).
 */
export async function addMembership(db: Db, input: { userId: string; schoolId: string; role: Role; byUserId: string | null }): Promise<void> {
  const [user, school] = await Promise.all([db.user.findUnique({ where: { id: input.userId } }), db.school.findUnique({ where: { id: input.schoolId } })]);
  if (!user || !school) throw new AccountError("not-found", "No such user or school.");
  try {
    await db.membership.create({ data: { userId: input.userId, schoolId: input.schoolId, role: input.role } });
  } catch (error) {
    if (error instanceof Prisma.PrismaClientKnownRequestError && error.code === "P2002") throw new AccountError("already-member", "That person is already a member of this school.");
    throw error;
  }
  await db.auditEvent.create({ data: { actorUserId: input.byUserId, schoolId: input.schoolId, action: "membership.add", entityType: "membership", entityId: `${input.userId}:${input.schoolId}`, details: { role: input.role } } });
}
