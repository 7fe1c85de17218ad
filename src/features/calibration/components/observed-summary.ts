import type { CalibrationResult } from '../../../../shared/scoring';
import { keyOf } from '../../../../shared/keys';

export interface ObservedLine {
  sku: string;
  /** 1-based line of the pasted text or file, so people can find it. */
  line: number;
}

/**
 * Reads an observed ordering, best first: one sku per line, or a CSV whose column named "sku" (or else its
 * first column) holds them. Blank lines and a header row are skipped; each sku keeps its line number.
 */
export function parseObservedLines(text: string): ObservedLine[] {
  const lines = text
    .split(/\r?\n/)
    .map((l, i) => ({ text: l.trim(), line: i + 1 }))
    .filter((l) => l.text !== '');
  if (lines.length === 0) return [];
  const cells = (line: string) => line.split(/[,;\t]/).map((c) => c.trim().replace(/^"|"$/g, ''));
  const header = cells(lines[0]!.text).map((c) => c.toLowerCase());
  const skuColumn = header.indexOf('sku');
  const start = skuColumn >= 0 || ['position', 'rank', 'item'].includes(header[0] ?? '') ? 1 : 0;
  const column = Math.max(0, skuColumn);
  return lines
    .slice(start)
    .map((l) => ({ sku: cells(l.text)[column] ?? '', line: l.line }))
    .filter((l) => l.sku !== '');
}

export interface ObservedSummary {
  read: number;
  /** Canonical skus in observed order, each once: what the fit receives. */
  matched: string[];
  duplicates: { sku: string; line: number; firstLine: number }[];
  /** Distinct skus neither known nor fixed, and not dropped. */
  unresolved: string[];
  unresolvedLines: number;
  droppedLines: number;
  /** Distinct skus not known as typed, fixed or not: the list people resolve. */
  unknown: string[];
}

/**
 * Every line read ends in exactly one of matched, duplicate, unresolved or dropped, so the counters on the
 * screen always add up to the lines read.
 */
export function summarizeObserved(
  lines: readonly ObservedLine[],
  known: ReadonlyMap<string, string>,
  fixes: Readonly<Record<string, string>>,
  dropped: ReadonlySet<string>,
): ObservedSummary {
  const matched: string[] = [];
  const firstLine = new Map<string, number>();
  const duplicates: ObservedSummary['duplicates'] = [];
  const unresolved = new Set<string>();
  const unknown = new Set<string>();
  let unresolvedLines = 0;
  let droppedLines = 0;
  for (const { sku, line } of lines) {
    if (!known.has(keyOf(sku))) unknown.add(sku);
    if (dropped.has(sku)) {
      droppedLines++;
      continue;
    }
    const canonical = known.get(keyOf(fixes[sku] ?? sku));
    if (canonical === undefined) {
      unresolved.add(sku);
      unresolvedLines++;
      continue;
    }
    const first = firstLine.get(canonical);
    if (first !== undefined) duplicates.push({ sku: canonical, line, firstLine: first });
    else {
      firstLine.set(canonical, line);
      matched.push(canonical);
    }
  }
  return {
    read: lines.length,
    matched,
    duplicates,
    unresolved: [...unresolved],
    unresolvedLines,
    droppedLines,
    unknown: [...unknown],
  };
}

/** The agreement curve's log axis: every step, the best interval and every named strategy's m on it. */
export function curveAxis(result: Pick<CalibrationResult, 'curve' | 'strategies'>): {
  lo: number;
  hi: number;
} {
  const steps = result.curve;
  const first = steps.find((s) => s.start > 0)?.start ?? 1;
  const lastStart = steps.at(-1)?.start ?? first;
  const ms = result.strategies.map((s) => s.m).filter((m): m is number => m !== null && m > 0);
  const lo = Math.max(Math.min(first, ...ms) / 4, 0.01);
  const hi = Math.max(lastStart * 4, ...ms.map((m) => m * 2), lo * 10);
  return { lo, hi };
}
