import os from 'node:os';
import path from 'node:path';
import { z } from 'zod';

const bool = z
  .enum(['true', 'false', '1', '0', 'yes', 'no'])
  .transform((v) => v === 'true' || v === '1' || v === 'yes');

const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  HOST: z.string().default('127.0.0.1'),
  PORT: z.coerce.number().int().min(1).max(65535).default(4600),
  PUBLIC_URL: z.string().url().optional(),
  DATABASE_URL: z.string().url().optional(),
  BALLAST_DATA_DIR: z.string().default('.data'),
  BALLAST_DB_PORT: z.coerce.number().int().min(1).max(65535).default(3407),
  SESSION_SECRET: z.string().min(16).optional(),
  TRUST_PROXY: bool.default(false),
  COOKIE_SECURE: z.enum(['auto', 'true', 'false']).default('auto'),
  LOGIN_MAX_ATTEMPTS: z.coerce.number().int().min(1).default(10),
  LOGIN_WINDOW_MINUTES: z.coerce.number().int().min(1).default(15),
  BALLAST_DEMO: bool.optional(),
  BALLAST_IMPORT_MAX_MB: z.coerce.number().int().min(1).max(10_240).default(250),
  BALLAST_SCHEDULER: bool.default(true),
  BALLAST_HEAP_GROWTH_PERCENT: z.coerce.number().int().min(0).max(1000).default(50),
  LOG_LEVEL: z.enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent']).default('info'),
  SMTP_HOST: z.string().min(1).optional(),
  SMTP_PORT: z.coerce.number().int().min(1).max(65535).default(587),
  SMTP_USER: z.string().optional(),
  SMTP_PASS: z.string().optional(),
  SMTP_SECURE: bool.default(false),
  MAIL_FROM: z.string().min(3).default('Ballast digests <digests@ballast.invalid>'),
  BALLAST_SMTP_PORT: z.coerce.number().int().min(0).max(65535).default(2525),
  DIGEST_PAPER: z.enum(['A4', 'LETTER', 'a4', 'letter']).default('A4'),
  UNSUBSCRIBE_SECRET: z.string().min(16).optional(),
  BALLAST_WORKERS: z.coerce.number().int().min(1).max(64).optional(),
  BALLAST_WORKER_QUEUE: z.coerce.number().int().min(0).max(1000).default(8),
  BALLAST_HEAVY_PER_PRINCIPAL: z.coerce.number().int().min(1).max(100).default(2),
  BALLAST_LANDING_PORT: z.coerce.number().int().min(0).max(65535).default(4602),
  BALLAST_WEBHOOK_TIMEOUT_MS: z.coerce.number().int().min(100).max(60_000).default(5_000),
  BALLAST_WEBHOOK_BACKOFF_MS: z.coerce.number().int().min(10).max(3_600_000).default(30_000),
  BALLAST_WEBHOOK_MAX_ATTEMPTS: z.coerce.number().int().min(1).max(50).default(10),
  BALLAST_WEBHOOK_MAX_RESPONSE_KB: z.coerce.number().int().min(1).max(10_240).default(64),
});

export type Env = z.infer<typeof envSchema>;

export type Config = {
  env: Env['NODE_ENV'];
  host: string;
  port: number;
  publicUrl: string;
  /** Set when Ballast uses a MariaDB server it did not start itself. */
  databaseUrl: string | undefined;
  dataDir: string;
  embeddedDbPort: number;
  sessionSecret: string | undefined;
  trustProxy: boolean;
  cookieSecure: 'auto' | boolean;
  login: { maxAttempts: number; windowMinutes: number };
  logLevel: Env['LOG_LEVEL'];
  /** Run report schedules in this process; switch off on app servers that should only answer requests. */
  scheduler: boolean;
  /** Largest import file accepted, in bytes. */
  importMaxBytes: number;
  /** How far V8 lets the heap grow past its live size before a full collection; 0 keeps V8's own rule. */
  heapGrowthPercent: number;
  mail: {
    /** A real SMTP server; null means Ballast's own local SMTP server on loopback (BALLAST_SMTP_PORT). */
    smtp: {
      host: string;
      port: number;
      secure: boolean;
      user: string | undefined;
      pass: string | undefined;
    } | null;
    localPort: number;
    from: string;
    /** Signs unsubscribe links; SESSION_SECRET when not set. */
    unsubscribeSecret: string;
  };
  digestPaper: 'A4' | 'LETTER';
  webhooks: {
    /** Ballast's local webhook receiver (the Landing) on loopback; 0 switches it off. */
    landingPort: number;
    /** Each request ends after this long (connect, send, answer). */
    timeoutMs: number;
    /** First retry after this long, doubling per attempt (capped at an hour). */
    backoffMs: number;
    maxAttempts: number;
    /** Ballast reads at most this much of a receiver's answer. */
    maxResponseBytes: number;
  };
  heavy: {
    /** Worker threads for CPU-heavy requests; one core stays with the event loop. */
    workers: number;
    /** Tasks waiting for a worker beyond which Ballast answers 503. */
    maxQueue: number;
    /** Heavy requests one user or one token may have in flight; the next is a 429. */
    perPrincipal: number;
  };
  /** Load the invented demo scenario; on by default only with the embedded database. */
  demo: boolean;
  rootDir: string;
};

export const rootDir = path.resolve(import.meta.dirname, '..', '..');

/** Parses the environment once; the only place in Ballast that reads process.env. */
export function loadConfig(source: NodeJS.ProcessEnv = process.env): Config {
  const parsed = envSchema.safeParse(source);
  if (!parsed.success) {
    const names = parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ');
    throw new Error(`Ballast cannot start, the environment is not valid: ${names}`);
  }
  const e = parsed.data;
  return {
    env: e.NODE_ENV,
    host: e.HOST,
    port: e.PORT,
    publicUrl: e.PUBLIC_URL ?? `http://${e.HOST === '0.0.0.0' ? '127.0.0.1' : e.HOST}:${e.PORT}`,
    databaseUrl: e.DATABASE_URL,
    dataDir: path.resolve(rootDir, e.BALLAST_DATA_DIR),
    embeddedDbPort: e.BALLAST_DB_PORT,
    sessionSecret: e.SESSION_SECRET,
    trustProxy: e.TRUST_PROXY,
    cookieSecure: e.COOKIE_SECURE === 'auto' ? 'auto' : e.COOKIE_SECURE === 'true',
    login: { maxAttempts: e.LOGIN_MAX_ATTEMPTS, windowMinutes: e.LOGIN_WINDOW_MINUTES },
    logLevel: e.LOG_LEVEL,
    scheduler: e.BALLAST_SCHEDULER,
    mail: {
      smtp: e.SMTP_HOST
        ? {
            host: e.SMTP_HOST,
            port: e.SMTP_PORT,
            secure: e.SMTP_SECURE,
            user: e.SMTP_USER,
            pass: e.SMTP_PASS,
          }
        : null,
      localPort: e.BALLAST_SMTP_PORT,
      from: e.MAIL_FROM,
      unsubscribeSecret: e.UNSUBSCRIBE_SECRET ?? e.SESSION_SECRET ?? 'ballast-development-unsubscribe-secret',
    },
    digestPaper: e.DIGEST_PAPER.toUpperCase() as 'A4' | 'LETTER',
    webhooks: {
      landingPort: e.BALLAST_LANDING_PORT,
      timeoutMs: e.BALLAST_WEBHOOK_TIMEOUT_MS,
      backoffMs: e.BALLAST_WEBHOOK_BACKOFF_MS,
      maxAttempts: e.BALLAST_WEBHOOK_MAX_ATTEMPTS,
      maxResponseBytes: e.BALLAST_WEBHOOK_MAX_RESPONSE_KB * 1024,
    },
    heavy: {
      workers: e.BALLAST_WORKERS ?? Math.max(1, os.availableParallelism() - 1),
      maxQueue: e.BALLAST_WORKER_QUEUE,
      perPrincipal: e.BALLAST_HEAVY_PER_PRINCIPAL,
    },
    demo: e.BALLAST_DEMO ?? !e.DATABASE_URL,
    importMaxBytes: e.BALLAST_IMPORT_MAX_MB * 1024 * 1024,
    heapGrowthPercent: e.BALLAST_HEAP_GROWTH_PERCENT,
    rootDir,
  };
}
