import { describe, expect, it } from 'vitest';
import {
  curveAxis,
  parseObservedLines,
  summarizeObserved,
} from '../../src/features/calibration/components/observed-summary';
import { keyOf } from '../../shared/keys';

const known = new Map(['TP-1', 'TP-2', 'TP-3'].map((s) => [keyOf(s), s]));
const addsUp = (s: ReturnType<typeof summarizeObserved>) =>
  s.matched.length + s.duplicates.length + s.unresolvedLines + s.droppedLines;

describe('the observed ordering on the calibration screen', () => {
  it('reports a repeated sku by its line and keeps its first position', () => {
    const lines = parseObservedLines('sku\nTP-2\n\nTP-1\nTP-2\nTP-3\n');
    expect(lines.map((l) => l.line)).toEqual([2, 4, 5, 6]);
    const s = summarizeObserved(lines, known, {}, new Set());
    expect(s.matched).toEqual(['TP-2', 'TP-1', 'TP-3']);
    expect(s.duplicates).toEqual([{ sku: 'TP-2', line: 5, firstLine: 2 }]);
    expect(addsUp(s)).toBe(s.read);
  });

  it('keeps the counters adding up to the lines read after an unknown sku is fixed or dropped', () => {
    const lines = parseObservedLines('TP-1\nTP-9\nTP-8\nTP-2\nTP-9');
    const before = summarizeObserved(lines, known, {}, new Set());
    expect([before.matched.length, before.unresolvedLines, addsUp(before)]).toEqual([2, 3, 5]);
    // TP-9 fixed to TP-3 on both of its lines; TP-8 fixed to TP-1, which is already listed on line 1.
    const fixed = summarizeObserved(lines, known, { 'TP-9': 'TP-3', 'TP-8': 'TP-1' }, new Set());
    expect(fixed.matched).toEqual(['TP-1', 'TP-3', 'TP-2']);
    expect(fixed.duplicates.map((d) => d.line)).toEqual([3, 5]);
    expect(fixed.unresolved).toEqual([]);
    expect(addsUp(fixed)).toBe(fixed.read);
    const dropped = summarizeObserved(lines, known, {}, new Set(['TP-9']));
    expect([dropped.droppedLines, dropped.unresolvedLines, addsUp(dropped)]).toEqual([2, 1, 5]);
  });
});

describe('the agreement curve axis', () => {
  it('covers every named strategy, the smallest count m = 1 included', () => {
    const axis = curveAxis({
      curve: [
        { start: 0, end: 8, tau: 0.2 },
        { start: 8, end: 30, tau: 0.5 },
        { start: 30, end: null, tau: 0.4 },
      ],
      strategies: [
        { strategy: 'min', m: 1, tau: 0.2, start: 0, end: 8 },
        { strategy: 'total', m: 5000, tau: 0.4, start: 30, end: null },
        { strategy: 'credibility', m: null, tau: null, start: null, end: null },
      ],
    });
    expect(axis.lo).toBeLessThan(1);
    expect(axis.hi).toBeGreaterThan(5000);
  });
});
