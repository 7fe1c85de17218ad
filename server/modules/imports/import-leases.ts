import { randomUUID } from 'node:crypto';
import os from 'node:os';
import { Op } from 'sequelize';
import { ImportBatch } from '../../db/models';

/**
 * Leases on unfinished imports, so that several app servers on one database never run one import twice
 * and a starting server does not take over (or fail) an import another live server is still running.
 * The holder renews its leases while it runs; a lease that has run out means its server stopped.
 * Times come from each server's clock: keep the servers' clocks in step (NTP) to well under a minute.
 */

/** This server process, as it appears in `import_batches.lease_owner`. */
export const importWorkerId = `${os.hostname()}:${process.pid}:${randomUUID().slice(0, 8)}`.slice(0, 120);

export const leaseSeconds = 60;
const renewEveryMs = 20_000;

const leaseEnd = (): Date => new Date(Date.now() + leaseSeconds * 1000);

export function newLease(owner = importWorkerId): { leaseOwner: string; leaseUntil: Date } {
  return { leaseOwner: owner, leaseUntil: leaseEnd() };
}

/**
 * Takes an unfinished import for `owner` when nobody holds it, `owner` already does, or the holder's
 * lease has run out. One conditional update decides, so two servers cannot both win.
 */
export async function claimImport(batchId: number, owner = importWorkerId): Promise<boolean> {
  const [changed] = await ImportBatch.update(newLease(owner), {
    where: {
      id: batchId,
      status: ['queued', 'running'],
      [Op.or]: [{ leaseOwner: null }, { leaseOwner: owner }, { leaseUntil: { [Op.lt]: new Date() } }],
    },
  });
  return changed === 1;
}

export async function releaseImport(batchId: number, owner = importWorkerId): Promise<void> {
  await ImportBatch.update(
    { leaseOwner: null, leaseUntil: null },
    { where: { id: batchId, leaseOwner: owner } },
  );
}

let keeper: NodeJS.Timeout | undefined;

/** Renews every lease this process holds, every 20 s, while `holding()` says it holds any. */
export function keepLeases(holding: () => boolean, owner = importWorkerId): void {
  if (keeper) return;
  keeper = setInterval(() => {
    if (!holding()) {
      clearInterval(keeper);
      keeper = undefined;
      return;
    }
    void ImportBatch.update(
      { leaseUntil: leaseEnd() },
      { where: { leaseOwner: owner, status: ['queued', 'running'] } },
    ).catch(() => {
      // The database is away; the next tick tries again well inside the lease.
    });
  }, renewEveryMs);
  keeper.unref();
}
