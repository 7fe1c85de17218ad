import type { ClientRateLimitInfo, Options, Store } from 'express-rate-limit';
import { QueryTypes, type Sequelize } from 'sequelize';

/**
 * An express-rate-limit store in MariaDB, so every app server counts the same hits. One atomic upsert
 * counts a hit, starting a fresh window once the old one has ended; the window runs on the database clock,
 * the one clock all servers share.
 */
export class SqlThrottleStore implements Store {
  localKeys = false;
  private windowMs = 60_000;

  constructor(
    private readonly sequelize: Sequelize,
    readonly prefix: string,
  ) {}

  init(options: Options): void {
    this.windowMs = options.windowMs;
  }

  private bucket(key: string): string {
    return `${this.prefix}:${key}`.slice(0, 200);
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const bucket = this.bucket(key);
    const micros = this.windowMs * 1000;
    await this.sequelize.query(
      `INSERT INTO sign_in_throttle (bucket, hits, reset_at)
         VALUES (?, 1, NOW(3) + INTERVAL ? MICROSECOND)
       ON DUPLICATE KEY UPDATE
         hits = IF(reset_at <= NOW(3), 1, hits + 1),
         reset_at = IF(reset_at <= NOW(3), NOW(3) + INTERVAL ? MICROSECOND, reset_at)`,
      { replacements: [bucket, micros, micros] },
    );
    const row = await this.sequelize.query<{ hits: number; reset_at: Date }>(
      'SELECT hits, reset_at FROM sign_in_throttle WHERE bucket = ?',
      { replacements: [bucket], type: QueryTypes.SELECT, plain: true },
    );
    return { totalHits: row?.hits ?? 1, resetTime: row ? new Date(row.reset_at) : undefined };
  }

  async decrement(key: string): Promise<void> {
    await this.sequelize.query('UPDATE sign_in_throttle SET hits = GREATEST(hits, 1) - 1 WHERE bucket = ?', {
      replacements: [this.bucket(key)],
    });
  }

  async resetKey(key: string): Promise<void> {
    await this.sequelize.query('DELETE FROM sign_in_throttle WHERE bucket = ?', {
      replacements: [this.bucket(key)],
    });
  }
}
