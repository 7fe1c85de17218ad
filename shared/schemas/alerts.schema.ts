import { z } from 'zod';
import { isTimeZone } from '../clock';

export const alertRules = [
  'new_cluster',
  'fell',
  'entered_top',
  'left_top',
  'went_stale',
  'thin_leader',
] as const;
export type AlertRule = (typeof alertRules)[number];

/**
 * The defaults of a category that has not changed a rule. Thresholds: places fallen (fell), the size of
 * the top (entered_top, left_top), the leading places watched for thin evidence (thin_leader). The daily
 * limit is how many alerts of one rule one person is mailed in any 24 hours; the rest wait in the history.
 */
export const alertRuleDefaults: Record<
  AlertRule,
  { enabled: boolean; threshold: number | null; dailyLimit: number }
> = {
  new_cluster: { enabled: true, threshold: null, dailyLimit: 10 },
  fell: { enabled: true, threshold: 10, dailyLimit: 5 },
  entered_top: { enabled: true, threshold: 10, dailyLimit: 5 },
  left_top: { enabled: true, threshold: 10, dailyLimit: 5 },
  went_stale: { enabled: true, threshold: null, dailyLimit: 5 },
  thin_leader: { enabled: true, threshold: 3, dailyLimit: 3 },
};

export const alertRuleSchema = z.object({
  rule: z.enum(alertRules),
  name: z.string(),
  enabled: z.boolean(),
  threshold: z.number().int().nullable(),
  dailyLimit: z.number().int(),
  isDefault: z.boolean(),
  updatedBy: z.string().nullable(),
});
export type AlertRuleSetting = z.infer<typeof alertRuleSchema>;

export const setAlertRuleSchema = z.object({
  enabled: z.boolean(),
  threshold: z
    .number({ error: 'Enter a whole number.' })
    .int('Enter a whole number.')
    .min(1, 'Use 1 or more.')
    .max(1000, 'Use 1000 or fewer.')
    .nullable()
    .optional(),
  dailyLimit: z
    .number({ error: 'Enter a whole number.' })
    .int('Enter a whole number.')
    .min(1, 'Allow at least one alert a day.')
    .max(500, 'Use 500 or fewer.'),
});
export type SetAlertRuleInput = z.infer<typeof setAlertRuleSchema>;

export const alertSources = ['import', 'snapshot', 'daily'] as const;
export type AlertSource = (typeof alertSources)[number];

export const alertEvidenceSchema = z.object({
  before: z.record(z.string(), z.unknown()).nullable(),
  after: z.record(z.string(), z.unknown()),
  reason: z.string(),
  phrases: z.array(z.object({ phrase: z.string(), count: z.number() })).optional(),
});
export type AlertEvidence = z.infer<typeof alertEvidenceSchema>;

export const alertRecordSchema = z.object({
  id: z.number().int(),
  rule: z.enum(alertRules),
  ruleName: z.string(),
  categoryId: z.number().int(),
  categorySlug: z.string(),
  categoryName: z.string(),
  sku: z.string(),
  itemTitle: z.string().nullable(),
  isoWeek: z.string(),
  source: z.enum(alertSources),
  importBatchId: z.number().int().nullable(),
  snapshotId: z.number().int().nullable(),
  headline: z.string(),
  evidence: alertEvidenceSchema,
  raisedAt: z.string(),
  /** For the caller's own history: whether it was mailed, waits, or was held by the daily limit. */
  mail: z.enum(['waiting', 'mailed', 'held']).nullable(),
});
export type AlertRecord = z.infer<typeof alertRecordSchema>;

export const alertListQuerySchema = z.object({
  rule: z.enum(alertRules).optional(),
  page: z.coerce.number().int().min(1).max(10_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(25),
});
export type AlertListQuery = z.infer<typeof alertListQuerySchema>;

export const alertListSchema = z.object({ items: z.array(alertRecordSchema), total: z.number().int() });
export type AlertList = z.infer<typeof alertListSchema>;

const clockTime = z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, 'Enter a time such as 22:00.');

export const alertPreferencesSchema = z.object({
  timeZone: z.string().refine(isTimeZone, 'Choose a time zone such as Europe/Berlin.'),
  /** Local wall-clock times; the same time twice means no quiet hours. */
  quietFrom: clockTime,
  quietUntil: clockTime,
});
export type AlertPreferences = z.infer<typeof alertPreferencesSchema>;

export const alertChoiceSchema = z.object({
  categoryId: z.number().int(),
  categoryName: z.string(),
  rule: z.enum(alertRules),
  ruleName: z.string(),
  ruleEnabled: z.boolean(),
  subscribed: z.boolean(),
  isDefault: z.boolean(),
});
export type AlertChoice = z.infer<typeof alertChoiceSchema>;

export const myAlertSettingsSchema = z.object({
  preferences: alertPreferencesSchema,
  choices: z.array(alertChoiceSchema),
});
export type MyAlertSettings = z.infer<typeof myAlertSettingsSchema>;

export const setAlertChoiceSchema = z.object({
  categoryId: z.number().int(),
  rule: z.enum(alertRules),
  subscribed: z.boolean(),
});
export type SetAlertChoiceInput = z.infer<typeof setAlertChoiceSchema>;

// Webhooks

export const webhookSchema = z.object({
  id: z.number().int(),
  name: z.string(),
  url: z.string(),
  enabled: z.boolean(),
  createdBy: z.string().nullable(),
  createdAt: z.string(),
  counts: z.object({ queued: z.number(), sending: z.number(), sent: z.number(), failed: z.number() }),
});
export type Webhook = z.infer<typeof webhookSchema>;

export const createWebhookSchema = z.object({
  name: z.string().trim().min(1, 'Give the webhook a name.').max(120, 'Use 120 characters or fewer.'),
  url: z
    .string()
    .trim()
    .max(2000, 'Use an address of 2000 characters or fewer.')
    .url('Enter an address such as https://chat.example/hooks/ballast.')
    .refine((u) => /^https?:\/\//i.test(u), 'Use an http or https address.'),
});
export type CreateWebhookInput = z.infer<typeof createWebhookSchema>;

export const createdWebhookSchema = webhookSchema.extend({ secret: z.string() });
export type CreatedWebhook = z.infer<typeof createdWebhookSchema>;

export const webhookDeliveryStatuses = ['queued', 'sending', 'sent', 'failed'] as const;
export const webhookDeliverySchema = z.object({
  id: z.number().int(),
  webhookId: z.number().int(),
  eventId: z.string(),
  alertId: z.number().int().nullable(),
  headline: z.string(),
  status: z.enum(webhookDeliveryStatuses),
  attempts: z.number().int(),
  nextAttemptAt: z.string().nullable(),
  lastError: z.string().nullable(),
  responseStatus: z.number().int().nullable(),
  sentAt: z.string().nullable(),
  createdAt: z.string(),
});
export type WebhookDelivery = z.infer<typeof webhookDeliverySchema>;

export const landingReceiptSchema = z.object({
  id: z.number().int(),
  path: z.string(),
  eventId: z.string().nullable(),
  verdict: z.string(),
  verdictText: z.string(),
  repeatOf: z.number().int().nullable(),
  headline: z.string().nullable(),
  body: z.string(),
  receivedAt: z.string(),
});
export type LandingReceipt = z.infer<typeof landingReceiptSchema>;
