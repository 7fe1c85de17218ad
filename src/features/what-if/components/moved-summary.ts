import { countOf } from '../../../../shared/plural';

/** How many items the preview moves, out of how many, and how many of the largest moves are marked. */
export function movedSummary(moved: number, total: number, marked: number): string {
  if (moved === 0) return 'No item changes its smoothed rank with these settings.';
  const which =
    marked >= moved
      ? moved === 1
        ? 'it is marked'
        : 'all are marked'
      : `the ${marked} that move most are marked`;
  return `${moved.toLocaleString('en-GB')} of ${countOf(total, 'item')} ${moved === 1 ? 'changes its' : 'change their'} smoothed rank; ${which}.`;
}
