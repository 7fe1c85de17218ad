import { describe, expect, it } from 'vitest';
import { LOG_HEAD_LINES, LOG_TAIL_LINES, capLog } from '../../../server/modules/jobs/jobs.service';

// Issue 14 point 7: plurals right in job logs too.
describe('capLog', () => {
  const lines = (n: number) => Array.from({ length: n }, (_, i) => `line ${i + 1}`);

  it('keeps a log that fits whole', () => {
    expect(capLog(lines(3))).toBe('line 1\nline 2\nline 3');
  });

  it('says "1 line left out" when one line is dropped', () => {
    const log = capLog(lines(LOG_HEAD_LINES + LOG_TAIL_LINES + 1)).split('\n');
    expect(log[LOG_HEAD_LINES]).toBe('… 1 line left out …');
    expect(log).toHaveLength(LOG_HEAD_LINES + LOG_TAIL_LINES + 1);
  });

  it('counts many dropped lines in the plural', () => {
    const log = capLog(lines(LOG_HEAD_LINES + LOG_TAIL_LINES + 2500)).split('\n');
    expect(log[LOG_HEAD_LINES]).toBe('… 2,500 lines left out …');
  });
});
