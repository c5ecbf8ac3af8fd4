import { Prisma, type Db } from "../db/index.ts";

/**
 * How a throttle key slows down guessing: the first `freeFailures` failed checks run at once; after
 * that each further check must wait `firstDelayMs`, doubling with every failure up to `maxDelayMs`.
 * A key left alone for `forgetAfterMs` starts again from zero. Nothing is ever locked for good:
 * a correct password after the wait signs in.
 */
export interface ThrottleRule {
  freeFailures: number;
  firstDelayMs: number;
  maxDelayMs: number;
  forgetAfterMs: number;
}

/** Per account: 5 free tries, then 15 s, 30 s, 1 min, … up to 5 min between checks. */
export const ACCOUNT_RULE: ThrottleRule = { freeFailures: 5, firstDelayMs: 15_000, maxDelayMs: 300_000, forgetAfterMs: 15 * 60_000 };
/** Per client address (many accounts from one place): 20 free tries, then the same doubling. */
export const ADDRESS_RULE: ThrottleRule = { freeFailures: 20, firstDelayMs: 15_000, maxDelayMs: 300_000, forgetAfterMs: 15 * 60_000 };

/** The wait before the next check once `failures` checks have been counted (0 while under the free allowance). */
export function delayAfterFailuresMs(rule: ThrottleRule, failures: number): number {
  if (failures < rule.freeFailures) return 0;
  const doublings = Math.min(failures - rule.freeFailures, 30);
  return Math.min(rule.maxDelayMs, rule.firstDelayMs * 2 ** doublings);
}

export type Reservation = { ok: true } | { ok: false; retryAfterMs: number };

const MAX_ROUNDS = 200;

function isUniqueViolation(error: unknown): boolean {
  return error instanceof Prisma.PrismaClientKnownRequestError && error.code === "P2002";
}

/**
 * Claims the right to run one password check for `key`, counting it as a failure in advance (a
 * success gives it back). The claim is a compare-and-set on the row's `failures` and `updatedAt`,
 * so N concurrent callers in any number of processes claim one at a time and at most the free
 * allowance runs before the wait begins. Refused claims change nothing.
 */
export async function reserveCheck(db: Db, key: string, rule: ThrottleRule): Promise<Reservation> {
  for (let round = 0; round < MAX_ROUNDS; round++) {
    const now = new Date();
    const row = await db.loginThrottle.findUnique({ where: { key } });
    if (!row) {
      try {
        await db.loginThrottle.create({ data: { key, failures: 0, nextCheckAt: now, updatedAt: now } });
      } catch (error) {
        if (!isUniqueViolation(error)) throw error;
      }
      continue;
    }
    if (row.nextCheckAt.getTime() > now.getTime()) return { ok: false, retryAfterMs: row.nextCheckAt.getTime() - now.getTime() };
    const forgotten = now.getTime() - row.updatedAt.getTime() > rule.forgetAfterMs;
    const failures = (forgotten ? 0 : row.failures) + 1;
    const claimed = await db.loginThrottle.updateMany({
      where: { key, failures: row.failures, updatedAt: row.updatedAt },
      data: { failures, nextCheckAt: new Date(now.getTime() + delayAfterFailuresMs(rule, failures)), updatedAt: now },
    });
    if (claimed.count === 1) return { ok: true };
  }
  // Hundreds of claims racing for one key: treat it as a burst and ask for a short wait.
  return { ok: false, retryAfterMs: 1_000 };
}

/** After a correct password: the account's count starts again and any wait ends. */
export async function clearFailures(db: Db, key: string): Promise<void> {
  await db.loginThrottle.updateMany({ where: { key }, data: { failures: 0, nextCheckAt: new Date(), updatedAt: new Date() } });
}

/** Gives back a claimed check that did not fail (a success, or a check that never ran). */
export async function refundCheck(db: Db, key: string): Promise<void> {
  await db.loginThrottle.updateMany({ where: { key, failures: { gt: 0 } }, data: { failures: { decrement: 1 } } });
}

/** Rows untouched for a day hold nothing a rule still uses (every wait and window is shorter): delete them. */
export async function pruneThrottles(db: Db, now = new Date()): Promise<number> {
  const { count } = await db.loginThrottle.deleteMany({ where: { updatedAt: { lt: new Date(now.getTime() - 86_400_000) }, nextCheckAt: { lt: now } } });
  return count;
}
