import { z } from 'zod';
import { roleCodes } from './auth';

export const userSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
  role: z.enum(roleCodes),
  active: z.boolean(),
  lockedUntil: z.string().nullable(),
  lastLoginAt: z.string().nullable(),
  categoryIds: z.array(z.number().int()),
});
export type UserRecord = z.infer<typeof userSchema>;

const password = z.string().min(12, 'Use at least 12 characters.').max(200, 'Use at most 200 characters.');

export const createUserSchema = z.object({
  email: z.string().trim().toLowerCase().email('Enter a valid e-mail address.').max(254),
  name: z.string().trim().min(1, 'Enter a name.').max(120),
  role: z.enum(roleCodes),
  password,
});
export type CreateUserInput = z.infer<typeof createUserSchema>;

export const updateUserSchema = z
  .object({
    name: z.string().trim().min(1).max(120),
    role: z.enum(roleCodes),
    active: z.boolean(),
    password,
    unlock: z.literal(true),
  })
  .partial()
  .refine((v) => Object.keys(v).length > 0, 'Send at least one field to change.');
export type UpdateUserInput = z.infer<typeof updateUserSchema>;

export const setOwnersSchema = z.object({ userIds: z.array(z.number().int().positive()).max(50) });

export const auditQuerySchema = z.object({
  action: z
    .string()
    .regex(/^[a-z_.]+$/, 'Use an action name such as auth.sign_in.')
    .max(60)
    .optional(),
  actor: z.string().max(254).optional(),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});
export type AuditQuery = z.infer<typeof auditQuerySchema>;

export const auditEntrySchema = z.object({
  id: z.number().int(),
  at: z.string(),
  actorEmail: z.string().nullable(),
  action: z.string(),
  targetType: z.string().nullable(),
  targetId: z.string().nullable(),
  details: z.record(z.string(), z.unknown()).nullable(),
  ip: z.string().nullable(),
});
export type AuditEntry = z.infer<typeof auditEntrySchema>;
