import { z } from 'zod';

/** Roles an API token may carry: the ones that may bring data into Ballast. */
export const tokenRoles = ['ops', 'manager', 'admin'] as const;
export type TokenRole = (typeof tokenRoles)[number];

export const tokenSecretPrefix = 'blst_';

export const createTokenSchema = z
  .object({
    name: z.string().trim().min(1, 'Give the token a name.').max(120, 'At most 120 characters.'),
    role: z.enum(tokenRoles, { error: 'Choose operations, category manager or administrator.' }),
    categoryIds: z.array(z.number().int().positive()).max(200).nullish(),
  })
  .refine((t) => t.role !== 'manager' || (t.categoryIds?.length ?? 0) > 0, {
    error: 'A category manager token must be limited to at least one category.',
    path: ['categoryIds'],
  });
export type CreateTokenInput = z.input<typeof createTokenSchema>;

export const apiTokenSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  prefix: z.string(),
  role: z.enum(tokenRoles),
  /** null: every category the role may reach. */
  categories: z.array(z.object({ id: z.number().int(), slug: z.string(), name: z.string() })).nullable(),
  createdBy: z.string().nullable(),
  /** The administrator who answers for the token (it stops while they are disabled); null: made by command. */
  createdById: z.number().int().nullable(),
  createdAt: z.string(),
  lastUsedAt: z.string().nullable(),
  revokedAt: z.string().nullable(),
});
export type ApiTokenRecord = z.infer<typeof apiTokenSchema>;

export const createdTokenSchema = z.object({
  token: apiTokenSchema,
  /** Shown once; Ballast keeps only its sha256. */
  secret: z.string(),
});
export type CreatedToken = z.infer<typeof createdTokenSchema>;

/** Hands a token to another active administrator, who answers for it from then on. */
export const reassignTokenSchema = z.object({
  userId: z.number({ error: 'Choose the administrator who takes the token over.' }).int().positive(),
});
export type ReassignTokenInput = z.infer<typeof reassignTokenSchema>;
