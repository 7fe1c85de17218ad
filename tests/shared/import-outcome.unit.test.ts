import { describe, expect, it } from 'vitest';
import {
  importedNothing,
  outcomeSentence,
  rejectedDownload,
  rowAccount,
} from '../../src/features/imports/outcome';

const batch = (over: Partial<Parameters<typeof outcomeSentence>[0]> = {}) => ({
  status: 'succeeded' as const,
  mode: 'valid_rows' as const,
  rowsRead: 7,
  rowsAccepted: 4,
  rowsRejected: 3,
  rowsInserted: 4,
  rowsUpdated: 0,
  errorMessage: null,
  ...over,
});

describe('the import outcome on screen', () => {
  it('says nothing was imported when no row was accepted, instead of "Imported"', () => {
    const b = batch({ rowsAccepted: 0, rowsRejected: 7, rowsInserted: 0 });
    expect(importedNothing(b)).toBe(true);
    expect(outcomeSentence(b)).toBe('Nothing was imported: all 7 rows read have mistakes.');
  });

  it('accounts for every row read: read 7, accepted 0, rejected 3 leaves 4 held back (all or nothing)', () => {
    const b = batch({ status: 'rejected', mode: 'all_or_nothing', rowsAccepted: 0, rowsInserted: 0 });
    const { heldBack, unchanged } = rowAccount(b);
    expect(heldBack).toBe(4);
    expect(b.rowsAccepted + b.rowsRejected + heldBack).toBe(b.rowsRead);
    expect(unchanged).toBe(0);
  });

  it('counts accepted rows that changed nothing as unchanged, so new + updated + unchanged = accepted', () => {
    const b = batch({ rowsAccepted: 4, rowsInserted: 1, rowsUpdated: 1 });
    expect(rowAccount(b).unchanged).toBe(2);
    expect(outcomeSentence(b)).toBe(
      'Done: 4 rows of 7 imported (1 new, 1 updated, 2 unchanged); 3 rows rejected.',
    );
  });

  it('says how many of how many rejected rows a capped download holds', () => {
    expect(rejectedDownload(25_000)).toEqual({
      kept: 10_000,
      label: 'Download the first 10,000 of 25,000 rejected rows (CSV)',
    });
    expect(rejectedDownload(1).label).toBe('Download the 1 rejected row (CSV)');
  });
});
