import type { CreateUserInput, UpdateUserInput, UserRecord } from '../../../shared/admin';
import { Category, User } from '../../db/models';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { recordAudit } from '../audit/audit.service';
import { hashPassword } from '../auth/auth.service';

type UserWithCategories = User & { ownedCategories?: Category[] };

function toRecord(user: UserWithCategories): UserRecord {
  return {
    id: user.id,
    email: user.email,
    name: user.name,
    role: user.role,
    active: user.active,
    lockedUntil: user.lockedUntil && user.lockedUntil > new Date() ? user.lockedUntil.toISOString() : null,
    lastLoginAt: user.lastLoginAt?.toISOString() ?? null,
    categoryIds: (user.ownedCategories ?? []).map((c) => c.id).sort((a, b) => a - b),
  };
}

const withCategories = {
  include: [{ model: Category, as: 'ownedCategories', attributes: ['id'], through: { attributes: [] } }],
};

export async function listUsers(): Promise<UserRecord[]> {
  const users = await User.findAll({ ...withCategories, order: [['email', 'ASC']] });
  return users.map(toRecord);
}

async function getUser(id: number): Promise<UserRecord> {
  const user = await User.findByPk(id, withCategories);
  if (!user) throw AppError.notFound('The user');
  return toRecord(user);
}

export async function createUser(
  input: CreateUserInput,
  actor: Actor | null,
  ip?: string,
): Promise<UserRecord> {
  const existing = await User.findOne({ where: { email: input.email }, attributes: ['id'] });
  if (existing) throw new AppError('conflict', 'A user with that e-mail already exists.', 409);
  const user = await User.create({
    email: input.email,
    name: input.name,
    role: input.role,
    passwordHash: await hashPassword(input.password),
    lockedUntil: null,
    lastLoginAt: null,
  });
  await recordAudit({
    actor,
    actorEmail: actor ? undefined : 'command line',
    action: 'user.created',
    targetType: 'user',
    targetId: user.id,
    details: { email: user.email, role: user.role },
    ip,
  });
  return getUser(user.id);
}

export async function updateUser(
  id: number,
  input: UpdateUserInput,
  actor: Actor,
  ip?: string,
): Promise<UserRecord> {
  const user = await User.findByPk(id);
  if (!user) throw AppError.notFound('The user');
  if (user.id === actor.id && (input.active === false || (input.role && input.role !== 'admin'))) {
    throw new AppError(
      'bad_request',
      'You cannot disable yourself or remove your own administrator role.',
      400,
    );
  }
  const changes: Partial<User> = {};
  if (input.name !== undefined) changes.name = input.name;
  if (input.role !== undefined) changes.role = input.role;
  if (input.active !== undefined) changes.active = input.active;
  if (input.password !== undefined) changes.passwordHash = await hashPassword(input.password);
  if (input.unlock) {
    changes.lockedUntil = null;
    changes.failedLogins = 0;
  }
  await user.update(changes);
  // A new password or disabling ends every session of the user: each request compares this version.
  if (input.password !== undefined || input.active === false) await user.increment('credentialVersion');
  await recordAudit({
    actor,
    action: 'user.updated',
    targetType: 'user',
    targetId: user.id,
    details: { ...input, password: input.password ? '(changed)' : undefined },
    ip,
  });
  return getUser(user.id);
}
