import { z } from 'zod';

export const roleCodes = ['admin', 'ops', 'manager', 'analyst', 'exec'] as const;
export type RoleCode = (typeof roleCodes)[number];

export const roleLabels: Record<RoleCode, string> = {
  admin: 'Administrator',
  ops: 'Operations',
  manager: 'Category manager',
  analyst: 'Analyst',
  exec: 'Executive',
};

export const roleDescriptions: Record<RoleCode, string> = {
  admin: 'Manages users, roles, category ownership and API tokens; reads the audit log.',
  ops: 'Sets report schedules and recipients, runs jobs, watches job history and deliveries.',
  manager: 'Owns categories: reads their digests, sets their scoring settings, flags items.',
  analyst: 'Explores any category: drift timelines, what-if previews, calibration, CSV exports.',
  exec: 'Reads the portfolio across categories and downloads digest PDFs.',
};

export const signInSchema = z.object({
  email: z.string().trim().toLowerCase().email('Enter a valid e-mail address.').max(254),
  password: z.string().min(1, 'Enter your password.').max(200),
});
export type SignInInput = z.infer<typeof signInSchema>;

export const meSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  name: z.string(),
  role: z.enum(roleCodes),
  categoryIds: z.array(z.number().int()),
});
export type Me = z.infer<typeof meSchema>;

export const categorySummarySchema = z.object({
  id: z.number().int(),
  slug: z.string(),
  name: z.string(),
  description: z.string(),
  owners: z.array(z.object({ id: z.number().int(), name: z.string(), email: z.string() })),
});
export type CategorySummary = z.infer<typeof categorySummarySchema>;

export const apiErrorSchema = z.object({
  error: z.object({ code: z.string(), message: z.string(), details: z.unknown().optional() }),
});
export type ApiErrorBody = z.infer<typeof apiErrorSchema>;
