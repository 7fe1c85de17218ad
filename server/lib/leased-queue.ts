import type { EventEmitter } from 'node:events';
import { Op, type Model, type ModelStatic, type WhereOptions } from 'sequelize';
import { logger } from './logger';

/**
 * The claim of Ballast's delivery queues (mail_deliveries, webhook_deliveries): rows with a status,
 * attempts, next_attempt_at and lease_until. A due row (queued and due, or sending with a lease that ran
 * out because its worker died) is claimed by one conditional update that also counts the attempt; only the
 * caller whose update changed the row owns it.
 */
export async function claimDue<M extends Model>(
  model: ModelStatic<M>,
  options: { now: Date; leaseMs: number; limit: number },
): Promise<number[]> {
  const { now } = options;
  const due = {
    [Op.or]: [
      { status: 'queued', nextAttemptAt: { [Op.lte]: now } },
      { status: 'sending', leaseUntil: { [Op.lt]: now } },
    ],
  } as unknown as WhereOptions<M>;
  const candidates = (await model.findAll({
    where: due,
    attributes: ['id'],
    order: [['id', 'ASC']],
    limit: options.limit,
  })) as unknown as { id: number }[];
  const claimed: number[] = [];
  for (const candidate of candidates) {
    const [changed] = await model.update(
      {
        status: 'sending',
        leaseUntil: new Date(now.getTime() + options.leaseMs),
        attempts: model.sequelize!.literal('attempts + 1'),
      } as never,
      { where: { [Op.and]: [{ id: candidate.id }, due] } as unknown as WhereOptions<M> },
    );
    if (changed === 1) claimed.push(candidate.id);
  }
  return claimed;
}

export type QueueWorker = { stop: () => Promise<void>; kick: () => void };

/**
 * The loop that drains one of those queues: a pass every `everyMs` and whenever `events` says 'queued'; a
 * pass that claimed a full batch runs again at once, and passes never overlap. `stop` waits for the running
 * pass.
 */
export function startQueueWorker(options: {
  name: string;
  everyMs: number;
  events: Pick<EventEmitter, 'on' | 'off'>;
  batch: number;
  drain: () => Promise<{ claimed: number }>;
}): QueueWorker {
  let running: Promise<void> | null = null;
  let again = false;
  let stopped = false;
  const pass = (): void => {
    if (stopped) return;
    if (running) {
      again = true;
      return;
    }
    running = (async () => {
      do {
        again = false;
        try {
          const result = await options.drain();
          if (result.claimed === options.batch) again = true;
        } catch (err) {
          logger.error(
            { err: err instanceof Error ? err.message : String(err) },
            `${options.name} worker pass failed`,
          );
        }
      } while (again && !stopped);
    })().finally(() => {
      running = null;
    });
  };
  const timer = setInterval(pass, options.everyMs);
  timer.unref();
  options.events.on('queued', pass);
  pass();
  return {
    kick: pass,
    stop: async () => {
      stopped = true;
      clearInterval(timer);
      options.events.off('queued', pass);
      if (running) await running;
    },
  };
}
