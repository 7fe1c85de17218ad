import { countOf } from '../../../shared/plural';
import { storedRowErrorsMax, type ImportBatchRecord } from '../../../shared/schemas/imports-api.schema';

type Counts = Pick<
  ImportBatchRecord,
  'status' | 'mode' | 'rowsRead' | 'rowsAccepted' | 'rowsRejected' | 'rowsInserted' | 'rowsUpdated'
>;

/**
 * Where every row read went, so that the figures on screen add up: read = accepted + rejected + held back,
 * and accepted = new + updated + unchanged. Rows are held back when an all-or-nothing import found mistakes
 * (good rows, not written), or when an import stopped part-way.
 */
export function rowAccount(b: Counts) {
  const heldBack = Math.max(0, b.rowsRead - b.rowsAccepted - b.rowsRejected);
  const unchanged = Math.max(0, b.rowsAccepted - b.rowsInserted - b.rowsUpdated);
  return { heldBack, unchanged };
}

/** A finished import that stored nothing is not "Imported", whatever its status. */
export function importedNothing(b: Counts): boolean {
  return b.status === 'succeeded' && b.rowsAccepted === 0;
}

/** The sentence under a finished import. */
export function outcomeSentence(b: Counts & { errorMessage: string | null }): string {
  const { heldBack, unchanged } = rowAccount(b);
  if (b.status !== 'succeeded') return b.errorMessage ?? 'The import did not finish.';
  if (b.rowsRead === 0) return 'Nothing was imported: the file has no rows.';
  if (b.rowsAccepted === 0)
    return `Nothing was imported: all ${countOf(b.rowsRead, 'row')} read have mistakes.`;
  const parts = [`${countOf(b.rowsAccepted, 'row')} of ${b.rowsRead.toLocaleString('en-GB')} imported`];
  const written = [
    b.rowsInserted > 0 ? `${b.rowsInserted.toLocaleString('en-GB')} new` : null,
    b.rowsUpdated > 0 ? `${b.rowsUpdated.toLocaleString('en-GB')} updated` : null,
    unchanged > 0 ? `${unchanged.toLocaleString('en-GB')} unchanged` : null,
  ].filter(Boolean);
  if (written.length > 0) parts[0] += ` (${written.join(', ')})`;
  if (b.rowsRejected > 0) parts.push(`${countOf(b.rowsRejected, 'row')} rejected`);
  if (heldBack > 0) parts.push(`${heldBack.toLocaleString('en-GB')} not written`);
  return `Done: ${parts.join('; ')}.`;
}

/** How many rejected rows the download holds: Ballast keeps the first 10,000 of an import. */
export function rejectedDownload(rowsRejected: number): { kept: number; label: string } {
  const kept = Math.min(rowsRejected, storedRowErrorsMax);
  const label =
    kept < rowsRejected
      ? `Download the first ${kept.toLocaleString('en-GB')} of ${rowsRejected.toLocaleString('en-GB')} rejected rows (CSV)`
      : `Download the ${countOf(rowsRejected, 'rejected row')} (CSV)`;
  return { kept, label };
}
