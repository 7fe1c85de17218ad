import { QueryTypes } from 'sequelize';
import { resolveSettings, ScoringInputError, type ScoringSettings } from '../../../shared/scoring';
import type {
  CalibrationNote,
  CalibrationNoteInput,
  CategorySettings,
  ScoringSettingsInput,
  WhatIfEvidence,
  WhatIfQuery,
} from '../../../shared/schemas/standings.schema';
import { evidenceBeforeSql } from '../../../shared/iso-week';
import { inUserWords } from '../../../shared/vocabulary';
import { CalibrationNote as CalibrationNoteModel, Category } from '../../db/models';
import { db } from '../../db/sequelize';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { recordAudit } from '../audit/audit.service';
import type { CategoryRef } from '../categories/categories.service';
import { loadCategoryEvidence } from '../snapshots/snapshot-evidence';
import { categorySettings } from '../snapshots/snapshots.service';
import { findWeek } from './standings.service';

async function storedSettings(
  category: CategoryRef,
): Promise<{ row: Category; stored: Record<string, unknown> }> {
  const row = await Category.findByPk(category.id);
  if (!row) throw AppError.notFound('The category');
  return { row, stored: { ...(row.settings ?? {}) } };
}

/**
 * The week's evidence summaries with the category's settings and the snapshot's resolved parameters, so the
 * browser can re-score them with the same engine the snapshot job used. A changed half-life changes the
 * decay sums, which only SQL can recompute: the browser asks again with it.
 */
export async function getWhatIfEvidence(
  category: CategoryRef,
  query: WhatIfQuery,
  actor: Actor,
): Promise<WhatIfEvidence> {
  const snapshot = await findWeek(category, query.week);
  const { stored } = await storedSettings(category);
  const settings: ScoringSettings = {
    ...categorySettings(stored),
    ...(query.halfLifeDays ? { halfLifeDays: query.halfLifeDays } : {}),
  };
  const evidence = await loadCategoryEvidence(category.id, snapshot.cutoff, settings);
  const previous = await db().query<{ sku: string; naive_rank: number; smoothed_rank: number }>(
    `SELECT i.sku, sr.naive_rank, sr.smoothed_rank FROM snapshot_rows sr JOIN items i ON i.id = sr.item_id
     WHERE sr.snapshot_id = (SELECT id FROM snapshots WHERE category_id = :categoryId AND iso_week < :week
                             ORDER BY iso_week DESC LIMIT 1)`,
    {
      replacements: { categoryId: category.id, week: snapshot.summary.isoWeek },
      type: QueryTypes.SELECT,
    },
  );
  const savedRows = await db().query<{ sku: string; n: number; naive_rank: number; smoothed_rank: number }>(
    `SELECT i.sku, sr.n, sr.naive_rank, sr.smoothed_rank FROM snapshot_rows sr JOIN items i ON i.id = sr.item_id
     WHERE sr.snapshot_id = :id ORDER BY sr.smoothed_rank, i.sku`,
    { replacements: { id: snapshot.id }, type: QueryTypes.SELECT },
  );
  const [late] = await db().query<{ late: number }>(
    `SELECT COUNT(*) AS late FROM reviews r JOIN items i ON i.id = r.item_id
     WHERE i.category_id = :categoryId AND ${evidenceBeforeSql('r.reviewed_at')} AND r.created_at > :takenAt`,
    {
      replacements: {
        categoryId: category.id,
        cutoff: snapshot.cutoff,
        takenAt: new Date(snapshot.summary.takenAt),
      },
      type: QueryTypes.SELECT,
    },
  );
  const lateReviews = Number(late?.late ?? 0);
  const itemCountNow = evidence.items.length;
  const reviewCountNow = evidence.items.reduce((sum, item) => sum + item.n, 0);
  return {
    saved: {
      week: snapshot.summary,
      rows: savedRows.map((r) => ({
        sku: r.sku,
        n: Number(r.n),
        naiveRank: Number(r.naive_rank),
        smoothedRank: Number(r.smoothed_rank),
      })),
    },
    evidenceChange: {
      changed:
        lateReviews > 0 ||
        itemCountNow !== snapshot.summary.itemCount ||
        reviewCountNow !== snapshot.summary.reviewCount,
      lateReviews,
      itemCountNow,
      reviewCountNow,
    },
    canRecompute: actor.role === 'ops' || actor.role === 'admin',
    isoWeek: snapshot.summary.isoWeek,
    asOf: snapshot.cutoff.toISOString(),
    settings: settings as unknown as Record<string, unknown>,
    resolved: snapshot.params as unknown as Record<string, unknown>,
    items: evidence.items as unknown as Record<string, unknown>[],
    previous:
      previous.length === 0
        ? null
        : previous.map((p) => ({
            sku: p.sku,
            naiveRank: Number(p.naive_rank),
            smoothedRank: Number(p.smoothed_rank),
          })),
  };
}

function canEditSettings(actor: Actor, categoryId: number): boolean {
  if (actor.role === 'admin') return true;
  return actor.role === 'manager' && (actor.categoryIds ?? []).includes(categoryId);
}

export async function getCategorySettings(category: CategoryRef, actor: Actor): Promise<CategorySettings> {
  const { row, stored } = await storedSettings(category);
  return {
    slug: category.slug,
    stored,
    effective: categorySettings(stored) as unknown as Record<string, unknown>,
    canEdit: canEditSettings(actor, category.id),
    updatedAt: row.updatedAt ? row.updatedAt.toISOString() : null,
  };
}

/**
 * Saves a change to a category's scoring settings (fields sent replace the stored ones; the rest stay),
 * refusing values the engine would reject, and records who changed what from what.
 */
export async function updateCategorySettings(
  category: CategoryRef,
  change: ScoringSettingsInput,
  actor: Actor,
  ip?: string,
): Promise<CategorySettings> {
  if (!canEditSettings(actor, category.id)) {
    throw AppError.forbidden('Only the managers of this category and administrators can save its settings.');
  }
  const { row, stored: before } = await storedSettings(category);
  const after: Record<string, unknown> = { ...before, ...change };
  try {
    resolveSettings(after);
  } catch (err) {
    if (err instanceof ScoringInputError) {
      throw new AppError('bad_request', inUserWords(err.path, err.reason), 400);
    }
    throw err;
  }
  row.settings = after;
  row.changed('settings', true);
  await row.save();
  await recordAudit({
    actor,
    action: 'category.settings_updated',
    targetType: 'category',
    targetId: category.slug,
    details: { before, after },
    ip,
  });
  return getCategorySettings(category, actor);
}

function toNote(row: CalibrationNoteModel): CalibrationNote {
  const result = row.result as Omit<CalibrationNoteInput, 'isoWeek' | 'note'>;
  return {
    ...result,
    id: row.id,
    isoWeek: row.isoWeek,
    note: row.note,
    createdAt: row.createdAt.toISOString(),
    createdBy: row.createdByName,
  };
}

export async function listCalibrationNotes(category: CategoryRef): Promise<CalibrationNote[]> {
  const rows = await CalibrationNoteModel.findAll({
    where: { categoryId: category.id },
    order: [
      ['createdAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: 50,
  });
  return rows.map(toNote);
}

/**
 * A stored note is read by everyone as evidence, so its figures must be ones calibrate() can produce
 * against the week it names: counts that add up, tau-b within [-1, 1], skus of that week, finite figures.
 */
export function calibrationNoteProblem(
  input: CalibrationNoteInput,
  weekSkus: ReadonlySet<string>,
): { field: string; reason: string } | null {
  const finite = (x: number | null) => x === null || Number.isFinite(x);
  const isTau = (t: number | null) => t === null || (Number.isFinite(t) && t >= -1 && t <= 1);
  if (input.matchedCount + input.unmatched.length !== input.observedCount)
    return {
      field: 'observedCount',
      reason: `${input.matchedCount} matched and ${input.unmatched.length} not found do not add up to ${input.observedCount} observed.`,
    };
  if (input.matchedCount > weekSkus.size)
    return {
      field: 'matchedCount',
      reason: `${input.matchedCount} items matched, but the week has only ${weekSkus.size}.`,
    };
  // A prior mean is a mean of 1-5 star ratings.
  if (!Number.isFinite(input.C) || input.C < 1 || input.C > 5)
    return { field: 'C', reason: `the prior mean ${input.C} is not between 1 and 5 stars.` };
  const { start, end, point, tau } = input.best;
  if (!finite(start) || !finite(end) || !finite(point))
    return { field: 'best', reason: 'the best interval has a figure that is not a finite number.' };
  if ((end !== null && (end < start || point > end)) || point < start)
    return { field: 'best', reason: 'the representative prior weight lies outside the best interval.' };
  if (!isTau(tau)) return { field: 'best.tau', reason: `tau-b ${tau} is not between -1 and 1.` };
  for (const s of input.strategies) {
    if (!finite(s.m) || (s.m !== null && s.m < 0))
      return {
        field: 'strategies',
        reason: `the prior weight of ${s.strategy} is not a finite number of 0 or more.`,
      };
    if (!isTau(s.tau))
      return { field: 'strategies', reason: `tau-b ${s.tau} of ${s.strategy} is not between -1 and 1.` };
  }
  if (input.unexplained.length > input.matchedCount)
    return { field: 'unexplained', reason: 'more items are unexplained than were matched.' };
  for (const u of input.unexplained) {
    if (!weekSkus.has(u.sku))
      return { field: 'unexplained', reason: `${u.sku} is not an item of ${input.isoWeek}.` };
    const inRange = (p: number) => p >= 1 && p <= input.matchedCount;
    if (
      !inRange(u.observedPosition) ||
      !inRange(u.fittedPosition) ||
      u.gap !== u.observedPosition - u.fittedPosition
    )
      return {
        field: 'unexplained',
        reason: `the positions given for ${u.sku} do not fit ${input.matchedCount} matched items.`,
      };
  }
  for (const sku of input.unmatched)
    if (weekSkus.has(sku))
      return {
        field: 'unmatched',
        reason: `${sku} is listed as not found, but it is an item of ${input.isoWeek}.`,
      };
  return null;
}

export async function saveCalibrationNote(
  category: CategoryRef,
  input: CalibrationNoteInput,
  actor: Actor,
): Promise<CalibrationNote> {
  const week = await findWeek(category, input.isoWeek);
  const rows = await db().query<{ sku: string }>(
    `SELECT i.sku FROM snapshot_rows sr JOIN items i ON i.id = sr.item_id WHERE sr.snapshot_id = :id`,
    { replacements: { id: week.id }, type: QueryTypes.SELECT },
  );
  const problem = calibrationNoteProblem(input, new Set(rows.map((r) => r.sku)));
  if (problem)
    throw new AppError('validation_failed', `This calibration cannot be saved: ${problem.reason}`, 400, [
      { path: problem.field, message: problem.reason },
    ]);
  const { isoWeek, note, ...result } = input;
  const row = await CalibrationNoteModel.create({
    categoryId: category.id,
    isoWeek,
    note,
    result,
    createdBy: actor.kind === 'user' ? actor.id : null,
    createdByName: actor.name,
  });
  return toNote(row);
}
