import bcrypt from 'bcryptjs';
import { addMinutes } from 'date-fns';
import { Category, User } from '../../db/models';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { recordAudit } from '../audit/audit.service';

export type LockoutPolicy = { maxAttempts: number; lockMinutes: number };

// Compared against when the e-mail is unknown, so the answer takes as long as for a real account.
const decoyHash = bcrypt.hashSync('ballast-decoy-password', 10);

export async function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, 10);
}

async function loadUser(userId: number): Promise<User | null> {
  const user = await User.findByPk(userId, {
    include: [{ model: Category, as: 'ownedCategories', attributes: ['id'], through: { attributes: [] } }],
  });
  return user && user.active ? user : null;
}

function toActor(user: User): Actor {
  const owned = (user as User & { ownedCategories?: Category[] }).ownedCategories ?? [];
  return {
    kind: 'user',
    id: user.id,
    email: user.email,
    name: user.name,
    role: user.role,
    categoryIds: user.role === 'manager' ? owned.map((c) => c.id).sort((a, b) => a - b) : null,
  };
}

export async function loadActor(userId: number): Promise<Actor | null> {
  const user = await loadUser(userId);
  return user ? toActor(user) : null;
}

/** What a session stores: the user and the credential version it was signed in under. */
export type SessionUser = { id: number; v: number };

export async function sessionUserFor(userId: number): Promise<SessionUser> {
  const user = await User.findByPk(userId, { attributes: ['credentialVersion'] });
  if (!user) throw AppError.unauthenticated('Sign in again.');
  return { id: userId, v: user.credentialVersion };
}

/**
 * The actor of a session, or null when the session has ended: user gone or disabled, or credentials changed
 * since it was signed in. Sessions from before credential versions (a bare id) count as version 0.
 */
export async function loadSessionActor(stored: SessionUser | number): Promise<Actor | null> {
  const { id, v } = typeof stored === 'number' ? { id: stored, v: 0 } : stored;
  const user = await loadUser(id);
  if (!user || user.credentialVersion !== v) return null;
  return toActor(user);
}

async function refuseLocked(email: string, lockedUntil: Date, now: Date, ip?: string): Promise<never> {
  await recordAudit({
    actorEmail: email,
    action: 'auth.sign_in_failed',
    details: { reason: 'locked' },
    ip,
  });
  const minutes = Math.max(1, Math.ceil((lockedUntil.getTime() - now.getTime()) / 60_000));
  throw new AppError(
    'account_locked',
    `This account is locked after too many failed sign-ins. Try again in ${minutes} minute${minutes === 1 ? '' : 's'}, or ask an administrator to unlock it.`,
    423,
  );
}

/** Checks an e-mail and password, counting failures towards a temporary lock of the account. */
export async function verifyCredentials(
  email: string,
  password: string,
  policy: LockoutPolicy,
  ip?: string,
): Promise<Actor> {
  const user = await User.findOne({ where: { email } });
  const now = new Date();
  if (!user) {
    await bcrypt.compare(password, decoyHash);
    await recordAudit({
      actorEmail: email,
      action: 'auth.sign_in_failed',
      details: { reason: 'unknown e-mail' },
      ip,
    });
    throw AppError.unauthenticated('That e-mail and password do not match an account.');
  }
  if (user.lockedUntil && user.lockedUntil > now) await refuseLocked(email, user.lockedUntil, now, ip);
  const matches = await bcrypt.compare(password, user.passwordHash);
  // Count and lock under a row lock, after the slow compare: parallel guesses each count once and none
  // slips through a lock that another guess set meanwhile.
  const outcome = await User.sequelize!.transaction(async (transaction) => {
    const row = await User.findByPk(user.id, { transaction, lock: transaction.LOCK.UPDATE });
    if (!row) return { kind: 'gone' as const };
    if (row.lockedUntil && row.lockedUntil > now) return { kind: 'locked' as const, until: row.lockedUntil };
    if (matches && row.active) {
      await row.update({ failedLogins: 0, lockedUntil: null, lastLoginAt: now }, { transaction });
      return { kind: 'ok' as const };
    }
    const failedLogins = row.failedLogins + 1;
    const lock = failedLogins >= policy.maxAttempts;
    await row.update(
      {
        failedLogins: lock ? 0 : failedLogins,
        lockedUntil: lock ? addMinutes(now, policy.lockMinutes) : null,
      },
      { transaction },
    );
    return { kind: 'failed' as const, lock, active: row.active };
  });
  if (outcome.kind === 'gone')
    throw AppError.unauthenticated('That e-mail and password do not match an account.');
  if (outcome.kind === 'locked') await refuseLocked(email, outcome.until, now, ip);
  if (outcome.kind === 'failed') {
    await recordAudit({
      actor: { kind: 'user', id: user.id, email: user.email },
      action: 'auth.sign_in_failed',
      details: { reason: outcome.active ? 'wrong password' : 'account disabled', locked: outcome.lock },
      ip,
    });
    if (!outcome.active && matches)
      throw AppError.forbidden('This account has been disabled. Ask an administrator.');
    throw AppError.unauthenticated('That e-mail and password do not match an account.');
  }
  const actor = await loadActor(user.id);
  if (!actor) throw AppError.unauthenticated('That e-mail and password do not match an account.');
  await recordAudit({ actor, action: 'auth.sign_in', ip });
  return actor;
}
