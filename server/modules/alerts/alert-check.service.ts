import { QueryTypes } from 'sequelize';
import { isoWeekLabel, lastCompletedIsoWeek } from '../../../shared/iso-week';
import { countOf } from '../../../shared/plural';
import type {
  AlertEvidence,
  AlertRule,
  AlertRuleSetting,
  AlertSource,
} from '../../../shared/schemas/alerts.schema';
import { Category } from '../../db/models';
import type { SnapshotRowDetails } from '../../db/models/snapshot-row.model';
import { db } from '../../db/sequelize';
import { logger } from '../../lib/logger';
import { runInWorker } from '../../workers/pool';
import type { AlertItemState } from '../../workers/tasks';
import { loadCategoryEvidence } from '../snapshots/snapshot-evidence';
import { categorySettings } from '../snapshots/snapshots.service';
import { alertEvents, type EvidenceEvent } from './alert-events';
import { categoryRules } from './alert-rules.service';
import { fanOut } from './alert-fanout.service';

export type CheckTrigger =
  | { source: 'import'; importBatchId: number }
  | { source: 'snapshot'; snapshotId: number }
  | { source: 'daily' };

type StateMap = Map<string, AlertItemState>;

export type Candidate = {
  rule: AlertRule;
  sku: string;
  headline: string;
  evidence: AlertEvidence;
};

function pick(s: AlertItemState | undefined): Record<string, unknown> | null {
  if (!s) return null;
  return {
    rank: s.rank,
    reviews: s.n,
    smoothed: Number(s.smoothed.toFixed(4)),
    cluster: s.cluster,
    stale: s.stale,
    thin: s.thin,
  };
}

function label(s: AlertItemState): string {
  return s.title ? `${s.title} (${s.sku})` : s.sku;
}

/**
 * What is new between two views of a category, rule by rule. "New" means true in `after` and not true in
 * `before` for the same item (an item absent from `before` counts as not true); a movement rule needs the
 * item in both views. The unique alert key (rule, category, item, ISO week) then keeps one alert a week.
 */
export function newFindings(before: StateMap, after: StateMap, rules: AlertRuleSetting[]): Candidate[] {
  const on = new Map(rules.filter((r) => r.enabled).map((r) => [r.rule, r]));
  const out: Candidate[] = [];
  const add = (rule: AlertRule, s: AlertItemState, headline: string, reason: string, extra = {}) =>
    out.push({
      rule,
      sku: s.sku,
      headline: `${label(s)}: ${headline}`,
      evidence: { before: pick(before.get(s.sku)), after: pick(s)!, reason, ...extra },
    });
  for (const s of [...after.values()].sort((a, b) => a.rank - b.rank || (a.sku < b.sku ? -1 : 1))) {
    const b = before.get(s.sku);
    if (on.has('new_cluster') && s.cluster === true && b?.cluster !== true) {
      add(
        'new_cluster',
        s,
        'new negative cluster',
        s.clusterReason ?? 'More one-star reviews than its usual rate.',
        {
          phrases: s.phrases,
        },
      );
    }
    const fell = on.get('fell');
    if (fell && b && s.rank - b.rank > fell.threshold!) {
      add(
        'fell',
        s,
        `fell ${countOf(s.rank - b.rank, 'place')}, from #${b.rank} to #${s.rank}`,
        `Smoothed rank #${b.rank} before, #${s.rank} now; the rule alerts above ${countOf(fell.threshold!, 'place')}.`,
      );
    }
    const entered = on.get('entered_top');
    if (entered && before.size > 0 && s.rank <= entered.threshold! && (!b || b.rank > entered.threshold!)) {
      add(
        'entered_top',
        s,
        `entered the top ${entered.threshold} at #${s.rank}`,
        b ? `Smoothed rank #${b.rank} before, #${s.rank} now.` : `New to the category at #${s.rank}.`,
      );
    }
    const left = on.get('left_top');
    if (left && b && b.rank <= left.threshold! && s.rank > left.threshold!) {
      add(
        'left_top',
        s,
        `left the top ${left.threshold}, now #${s.rank}`,
        `Smoothed rank #${b.rank} before, #${s.rank} now.`,
      );
    }
    if (on.has('went_stale') && b && s.stale === true && b.stale !== true) {
      add('went_stale', s, 'went stale', s.staleReason ?? 'No recent reviews.');
    }
    const leader = on.get('thin_leader');
    if (leader && s.rank <= leader.threshold! && s.thin && !(b && b.rank <= leader.threshold! && b.thin)) {
      add(
        'thin_leader',
        s,
        `#${s.rank} on ${countOf(s.n, 'review')} only`,
        `In the top ${leader.threshold} with thin evidence (${countOf(s.n, 'review')}); the rank can change with a few reviews.`,
      );
    }
  }
  return out;
}

type SnapshotRowRead = {
  sku: string;
  title: string | null;
  smoothed_rank: number;
  n: number;
  smoothed: number;
  negative_cluster: number | null;
  stale: number | null;
  thin: number;
  details: string | SnapshotRowDetails;
};

async function snapshotState(snapshotId: number): Promise<StateMap> {
  const rows = await db().query<SnapshotRowRead>(
    `SELECT i.sku, i.title, sr.smoothed_rank, sr.n, sr.smoothed, sr.negative_cluster, sr.stale, sr.thin, sr.details
     FROM snapshot_rows sr JOIN items i ON i.id = sr.item_id WHERE sr.snapshot_id = :snapshotId`,
    { replacements: { snapshotId }, type: QueryTypes.SELECT },
  );
  return new Map(
    rows.map((r) => {
      const d = (typeof r.details === 'string' ? JSON.parse(r.details) : r.details) as SnapshotRowDetails;
      const nullable = (v: number | null) => (v === null ? null : Boolean(v));
      return [
        r.sku,
        {
          sku: r.sku,
          title: r.title,
          rank: Number(r.smoothed_rank),
          n: Number(r.n),
          smoothed: Number(r.smoothed),
          cluster: nullable(r.negative_cluster),
          clusterReason: d?.clusterReason ?? null,
          phrases: d?.recurringPhrases ?? [],
          stale: nullable(r.stale),
          staleReason: d?.staleReason ?? null,
          thin: Boolean(r.thin),
        },
      ];
    }),
  );
}

/** The engine's view of a category now, computed in the worker pool, off the event loop. */
async function liveState(categoryId: number, now: Date): Promise<StateMap> {
  const category = await Category.findByPk(categoryId);
  if (!category) return new Map();
  const settings = categorySettings(category.settings);
  const evidence = await loadCategoryEvidence(categoryId, now, settings);
  if (evidence.items.length === 0) return new Map();
  const items = await runInWorker<AlertItemState[]>({
    kind: 'alert-state',
    items: evidence.items,
    settings,
    asOf: now.toISOString(),
  });
  return new Map(items.map((s) => [s.sku, s]));
}

async function storedState(categoryId: number): Promise<StateMap | null> {
  const [row] = await db().query<{ items: string | AlertItemState[] }>(
    'SELECT items FROM alert_states WHERE category_id = :categoryId',
    { replacements: { categoryId }, type: QueryTypes.SELECT },
  );
  if (!row) return null;
  const items = (typeof row.items === 'string' ? JSON.parse(row.items) : row.items) as AlertItemState[];
  return new Map(items.map((s) => [s.sku, s]));
}

async function latestSnapshotId(categoryId: number, beforeId?: number): Promise<number | null> {
  const [row] = await db().query<{ id: number }>(
    `SELECT id FROM snapshots WHERE category_id = :categoryId ${beforeId ? 'AND id <> :beforeId AND iso_week < (SELECT iso_week FROM snapshots WHERE id = :beforeId)' : ''}
     ORDER BY iso_week DESC LIMIT 1`,
    { replacements: { categoryId, beforeId: beforeId ?? null }, type: QueryTypes.SELECT },
  );
  return row ? Number(row.id) : null;
}

async function saveState(categoryId: number, state: StateMap, source: AlertSource, now: Date): Promise<void> {
  await db().query(
    `INSERT INTO alert_states (category_id, evaluated_at, source, items) VALUES (:categoryId, :now, :source, :items)
     ON DUPLICATE KEY UPDATE evaluated_at = VALUES(evaluated_at), source = VALUES(source), items = VALUES(items)`,
    { replacements: { categoryId, now, source, items: JSON.stringify([...state.values()]) } },
  );
}

export type CheckOutcome = { categoryId: number; raised: number; isoWeek: string; baseline: string };

/**
 * One alert check of a category. The "before" is what the previous check saw (alert_states); a category
 * never checked before compares with its latest snapshot, and with no snapshot either the check only
 * records what it sees. The "after" is the engine on the evidence as of `now`, or the rows of a snapshot
 * just taken. New alerts are stored once per key and handed to mail and webhooks.
 */
export async function checkCategory(
  categoryId: number,
  trigger: CheckTrigger,
  now = new Date(),
): Promise<CheckOutcome> {
  let after: StateMap;
  let isoWeek = isoWeekLabel(now);
  if (trigger.source === 'snapshot') {
    const [snap] = await db().query<{ iso_week: string }>('SELECT iso_week FROM snapshots WHERE id = :id', {
      replacements: { id: trigger.snapshotId },
      type: QueryTypes.SELECT,
    });
    // A backfill recomputes past weeks: news of a week long gone is no alert.
    if (!snap || snap.iso_week < lastCompletedIsoWeek(now)) {
      return { categoryId, raised: 0, isoWeek: snap?.iso_week ?? isoWeek, baseline: 'none' };
    }
    isoWeek = snap.iso_week;
    after = await snapshotState(trigger.snapshotId);
  } else {
    after = await liveState(categoryId, now);
  }
  if (after.size === 0) return { categoryId, raised: 0, isoWeek, baseline: 'none' };

  let before = await storedState(categoryId);
  let baseline = 'previous check';
  if (!before) {
    const snapshotId = await latestSnapshotId(
      categoryId,
      trigger.source === 'snapshot' ? trigger.snapshotId : undefined,
    );
    before = snapshotId ? await snapshotState(snapshotId) : null;
    baseline = snapshotId ? `snapshot ${snapshotId}` : 'none';
  }
  const source: AlertSource = trigger.source;
  if (!before) {
    await saveState(categoryId, after, source, now);
    return { categoryId, raised: 0, isoWeek, baseline };
  }
  const candidates = newFindings(before, after, await categoryRules(categoryId));
  const ids = await storeAlerts(categoryId, candidates, trigger, isoWeek, now);
  await saveState(categoryId, after, source, now);
  if (ids.length > 0) {
    await fanOut(ids, now);
    alertEvents.emit('raised');
  }
  return { categoryId, raised: ids.length, isoWeek, baseline };
}

async function storeAlerts(
  categoryId: number,
  candidates: Candidate[],
  trigger: CheckTrigger,
  isoWeek: string,
  now: Date,
): Promise<number[]> {
  const ids: number[] = [];
  for (const c of candidates) {
    const key = `${c.rule}|${categoryId}|${c.sku}|${isoWeek}`;
    const [, affected] = (await db().query(
      `INSERT IGNORE INTO alerts (alert_key, rule, category_id, item_id, sku, iso_week, source, import_batch_id,
         snapshot_id, headline, evidence, raised_at)
       VALUES (:key, :rule, :categoryId, (SELECT id FROM items WHERE category_id = :categoryId AND sku = :sku),
         :sku, :isoWeek, :source, :importBatchId, :snapshotId, :headline, :evidence, :now)`,
      {
        replacements: {
          key,
          rule: c.rule,
          categoryId,
          sku: c.sku,
          isoWeek,
          source: trigger.source,
          importBatchId: trigger.source === 'import' ? trigger.importBatchId : null,
          snapshotId: trigger.source === 'snapshot' ? trigger.snapshotId : null,
          headline: c.headline.slice(0, 500),
          evidence: JSON.stringify(c.evidence),
          now,
        },
        type: QueryTypes.INSERT,
      },
    )) as unknown as [number, number];
    if (affected !== 1) continue;
    const [row] = await db().query<{ id: number }>('SELECT id FROM alerts WHERE alert_key = :key', {
      replacements: { key },
      type: QueryTypes.SELECT,
    });
    if (row) ids.push(Number(row.id));
  }
  return ids;
}

/** The categories whose evidence an import batch wrote. */
export async function categoriesOfBatch(importBatchId: number): Promise<number[]> {
  const rows = await db().query<{ category_id: number }>(
    `SELECT DISTINCT i.category_id FROM reviews r JOIN items i ON i.id = r.item_id WHERE r.import_batch_id = :id
     UNION SELECT DISTINCT i.category_id FROM aggregate_observations a JOIN items i ON i.id = a.item_id
       WHERE a.import_batch_id = :id`,
    { replacements: { id: importBatchId }, type: QueryTypes.SELECT },
  );
  return rows.map((r) => Number(r.category_id));
}

let queue: Promise<unknown> = Promise.resolve();
let pending = 0;

/** Checks run one at a time in this process, after the import or snapshot that asked for them. */
export function queueCheck(event: EvidenceEvent, now: () => Date = () => new Date()): void {
  pending += 1;
  queue = queue
    .then(async () => {
      if (event.source === 'import') {
        for (const categoryId of await categoriesOfBatch(event.importBatchId)) {
          await checkCategory(categoryId, { source: 'import', importBatchId: event.importBatchId }, now());
        }
      } else {
        await checkCategory(event.categoryId, { source: 'snapshot', snapshotId: event.snapshotId }, now());
      }
    })
    .catch((err: unknown) =>
      logger.error({ err: err instanceof Error ? err.message : String(err), event }, 'alert check failed'),
    )
    .finally(() => {
      pending -= 1;
    });
}

/** Resolves once every queued check has finished (tests and shutdown). */
export async function checksIdle(): Promise<void> {
  while (pending > 0) await queue;
}

/** Follows new evidence from imports and snapshots; returns the function that stops following. */
export function listenForEvidence(now?: () => Date): () => void {
  const onEvidence = (event: EvidenceEvent) => queueCheck(event, now);
  alertEvents.on('evidence', onEvidence);
  return () => alertEvents.off('evidence', onEvidence);
}
