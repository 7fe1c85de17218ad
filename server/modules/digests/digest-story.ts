import type {
  CategoryDigestData,
  DigestItem,
  DigestKeyFigure,
  DigestPreviousWeek,
} from '../../../shared/schemas/digests.schema';
import type { CategoryFigures, ResolvedParameters } from '../../../shared/scoring';
import { countOf } from '../../../shared/plural';
import { moveClarity, rankWords, terms } from '../../../shared/vocabulary';

/** A title short enough for a sentence; tables cut by measured width instead. */
export function shortTitle(title: string, max = 48): string {
  const chars = [...title.replace(/\s+/g, ' ').trim()];
  return chars.length <= max
    ? chars.join('')
    : `${chars
        .slice(0, max - 1)
        .join('')
        .trimEnd()}…`;
}

function named(item: DigestItem): string {
  return `${item.sku} (${shortTitle(item.title)})`;
}

function fixed(value: number | null, digits: number): string {
  return value === null ? 'not available' : value.toFixed(digits);
}

function agreement(rho: number | null): string {
  if (rho === null) return 'cannot be compared';
  if (rho >= 0.9) return 'agree closely';
  if (rho >= 0.7) return 'largely agree';
  if (rho >= 0.5) return 'agree only in part';
  return 'disagree widely';
}

type StoryInput = {
  figures: CategoryFigures;
  params: ResolvedParameters;
  items: DigestItem[];
  previous: DigestPreviousWeek | null;
};

/** Per mover with rank ranges in both weeks: clear when the ranges do not overlap (shared/vocabulary.ts). */
export function moverClarity(
  items: readonly DigestItem[],
  previous: DigestPreviousWeek | null,
): Map<string, 'clear' | 'noise'> {
  const out = new Map<string, 'clear' | 'noise'>();
  const ranges = previous?.moverRanges;
  if (!ranges) return out;
  for (const item of items) {
    const before = ranges[item.sku];
    if (!before) continue;
    const c = moveClarity(before, { low: item.rankLow ?? null, high: item.rankHigh ?? null });
    if (c) out.set(item.sku, c);
  }
  return out;
}

/** The week in plain sentences: what stands out now, and what changed since the week before. */
export function buildStory({ figures: f, params, items, previous }: StoryInput): CategoryDigestData['story'] {
  const headline: string[] = [];
  headline.push(
    `${countOf(f.itemCount, 'item')} with ${countOf(f.reviewCount, 'review')}; the typical rating C is ${params.C.toFixed(2)} stars and each item's mean is pulled towards it with the weight of ${params.m.toFixed(1)} reviews.`,
  );
  headline.push(
    `The raw and smoothed orderings ${agreement(f.spearmanRho)} (${terms.spearman} ${fixed(f.spearmanRho, 3)}); ${f.topOverlap.shared} of the top ${f.topOverlap.depth} are the same in both.`,
  );
  const depth = Math.max(20, Math.ceil(items.length * 0.1));
  const thinLeaders = items
    .filter((i) => i.thin && i.naiveRank <= depth)
    .sort((a, b) => a.naiveRank - b.naiveRank);
  const lead = thinLeaders[0];
  if (lead) {
    headline.push(
      `${named(lead)} is number ${lead.naiveRank} by raw mean on only ${countOf(lead.n, 'review')}; the smoothed score places it ${lead.smoothedRank}.`,
    );
  }
  const buried = items
    .filter((i) => i.drift >= 5 && !i.thin && i.smoothedRank <= Math.max(25, Math.ceil(items.length * 0.1)))
    .sort((a, b) => a.smoothedRank - b.smoothedRank)[0];
  if (buried) {
    headline.push(
      `${named(buried)} ranks ${buried.smoothedRank} by smoothed score on ${countOf(buried.n, 'review')}, but only ${buried.naiveRank} in a raw sort.`,
    );
  }
  const clusters = items.filter((i) => i.negativeCluster);
  if (clusters.length > 0) {
    const first = [...clusters].sort((a, b) => (a.clusterPValue ?? 1) - (b.clusterPValue ?? 1))[0]!;
    const phrase = first.recurringPhrases[0];
    headline.push(
      `${countOf(clusters.length, 'item shows', 'items show')} a burst of one-star reviews; ${named(first)} leads${phrase ? `, with "${phrase.phrase}" in ${countOf(phrase.count, 'review')}` : ''}.`,
    );
  }
  if (f.staleCount > 0) {
    headline.push(
      `${countOf(f.staleCount, 'item has', 'items have')} had no new review for more than ${params.staleAfterDays} days.`,
    );
  }

  const changes: string[] = [];
  if (!previous) {
    changes.push(
      'This is the first weekly snapshot of the category; next week’s digest compares against it.',
    );
    return { headline, changes };
  }
  const added = f.reviewCount - previous.reviewCount;
  changes.push(
    added === 0
      ? 'No new reviews arrived since last week.'
      : `${countOf(Math.abs(added), 'review')} ${added > 0 ? 'more' : 'fewer'} than last week (${previous.reviewCount.toLocaleString('en-GB')} then).`,
  );
  // The largest rise and fall come straight after the review count: a shortened list (the portfolio
  // digest's) keeps its first lines, so neither can be the one dropped.
  const up = [...f.movers].sort((a, b) => b.smoothedMovement - a.smoothedMovement)[0];
  const down = [...f.movers].sort((a, b) => a.smoothedMovement - b.smoothedMovement)[0];
  const title = (sku: string) => {
    const item = items.find((i) => i.sku === sku);
    return item ? named(item) : sku;
  };
  const clarity = moverClarity(items, previous);
  const judged = (sku: string) => {
    const c = clarity.get(sku);
    return c === 'clear' ? ` — ${rankWords.clearMove}` : c === 'noise' ? ` — ${rankWords.withinNoise}` : '';
  };
  if (up && up.smoothedMovement > 0) {
    changes.push(
      `Biggest rise by smoothed score: ${title(up.sku)}, up ${countOf(up.smoothedMovement, 'place')}${judged(up.sku)}.`,
    );
  }
  if (down && down.smoothedMovement < 0) {
    changes.push(
      `Biggest fall: ${title(down.sku)}, down ${countOf(-down.smoothedMovement, 'place')}${judged(down.sku)}.`,
    );
  }
  const judgedMovers = f.movers.filter((m) => m.smoothedMovement !== 0 && clarity.has(m.sku));
  if (judgedMovers.length > 0) {
    const clear = judgedMovers.filter((m) => clarity.get(m.sku) === 'clear');
    const listed = clear
      .slice(0, 4)
      .map((m) => `${title(m.sku)} ${m.smoothedMovement > 0 ? 'up' : 'down'} ${Math.abs(m.smoothedMovement)}`)
      .join(', ');
    changes.push(
      clear.length === 0
        ? `All ${countOf(judgedMovers.length, 'smoothed move')} of the week are ${rankWords.withinNoise}. ${rankWords.rule}`
        : `${clear.length} of ${countOf(judgedMovers.length, 'smoothed move')} ${clear.length === 1 ? 'is a' : 'are'} ${clear.length === 1 ? rankWords.clearMove : `${rankWords.clearMove}s`}: ${listed}${clear.length > 4 ? ` and ${clear.length - 4} more` : ''}; the rest are ${rankWords.withinNoise}. ${rankWords.rule}`,
    );
  }
  if (f.spearmanRho !== null && previous.spearmanRho !== null) {
    const d = f.spearmanRho - previous.spearmanRho;
    changes.push(
      Math.abs(d) < 0.0005
        ? `Agreement between the orderings held at rho ${f.spearmanRho.toFixed(3)}.`
        : `Agreement between the orderings ${d > 0 ? 'rose' : 'fell'} from rho ${previous.spearmanRho.toFixed(3)} to ${f.spearmanRho.toFixed(3)}.`,
    );
  }
  const topNow = items.filter((i) => i.smoothedRank <= 10).map((i) => i.sku);
  const entered = topNow.filter((s) => !previous.topTen.includes(s));
  const left = previous.topTen.filter((s) => !topNow.includes(s));
  if (entered.length === 0 && left.length === 0) changes.push('The smoothed top ten is unchanged.');
  else {
    const bySku = new Map(items.map((i) => [i.sku, i]));
    const list = (skus: string[]) =>
      skus
        .slice(0, 4)
        .map((s) => (bySku.get(s) ? named(bySku.get(s)!) : s))
        .join(', ') + (skus.length > 4 ? ` and ${skus.length - 4} more` : '');
    if (entered.length) changes.push(`Entered the smoothed top ten: ${list(entered)}.`);
    if (left.length) changes.push(`Left the smoothed top ten: ${list(left)}.`);
  }
  const flagChange = (label: string, now: number, before: number): void => {
    if (now !== before)
      changes.push(`${label} went from ${before.toLocaleString('en-GB')} to ${now.toLocaleString('en-GB')}.`);
  };
  flagChange('Items on thin evidence', f.thinCount, previous.thinCount);
  flagChange('Stale items', f.staleCount, previous.staleCount);
  flagChange('Negative clusters', f.negativeClusterCount, previous.clusterCount);
  return { headline, changes };
}

/** The figures the mail repeats inline, in the same words as the PDF's first page. */
export function keyFigures(data: CategoryDigestData): DigestKeyFigure[] {
  const f = data.figures;
  const p = data.previous;
  const delta = (
    now: number | null,
    before: number | null | undefined,
    digits: number,
  ): string | undefined => {
    if (now === null || before === null || before === undefined) return undefined;
    const d = now - before;
    if (Math.abs(d) < 10 ** -digits / 2) return 'unchanged';
    return `${d > 0 ? '+' : '−'}${Math.abs(d).toFixed(digits)} on last week`;
  };
  const row = (label: string, value: string, note: string | undefined): DigestKeyFigure =>
    note ? { label, value, note } : { label, value };
  return [
    row('Items ranked', f.itemCount.toLocaleString('en-GB'), delta(f.itemCount, p?.itemCount, 0)),
    row('Reviews counted', f.reviewCount.toLocaleString('en-GB'), delta(f.reviewCount, p?.reviewCount, 0)),
    row(terms.spearman, fixed(f.spearmanRho, 3), delta(f.spearmanRho, p?.spearmanRho, 3)),
    row(terms.kendall, fixed(f.kendallTauB, 3), delta(f.kendallTauB, p?.kendallTauB, 3)),
    row('Mean |drift|', f.meanAbsDrift.toFixed(1), delta(f.meanAbsDrift, p?.meanAbsDrift, 1)),
    row(`Top ${f.topOverlap.depth} shared`, `${f.topOverlap.shared} of ${f.topOverlap.depth}`, undefined),
    row('Thin · stale · clusters', `${f.thinCount} · ${f.staleCount} · ${f.negativeClusterCount}`, undefined),
  ];
}
