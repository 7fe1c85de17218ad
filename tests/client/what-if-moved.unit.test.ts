import { describe, expect, it } from 'vitest';
import { movedSummary } from '../../src/features/what-if/components/moved-summary';

// Issue 14 point 7: plurals right everywhere, and no sentence that claims more than is on screen.
describe('what-if: the sentence about moved items', () => {
  it('says nothing moved when nothing did', () => {
    expect(movedSummary(0, 115, 0)).toBe('No item changes its smoothed rank with these settings.');
  });

  it('counts one moved item in the singular and does not speak of ten marked', () => {
    expect(movedSummary(1, 115, 1)).toBe('1 of 115 items changes its smoothed rank; it is marked.');
  });

  it('says all are marked when fewer than ten moved', () => {
    expect(movedSummary(3, 115, 3)).toBe('3 of 115 items change their smoothed rank; all are marked.');
  });

  it('names how many of the largest moves are marked when more moved', () => {
    expect(movedSummary(1204, 1500, 10)).toBe(
      '1,204 of 1,500 items change their smoothed rank; the 10 that move most are marked.',
    );
  });
});
