import { performance } from 'node:perf_hooks';
import { pathToFileURL } from 'node:url';
import type { CategoryDigestData, DigestItem } from '../../shared/schemas/digests.schema';
import { buildStory } from '../modules/digests/digest-story';
import { renderCategoryDigest } from '../../templates/pdf/category-digest';

/** A 500-item category built in memory (a deterministic generator; no database). */
export function syntheticCategory(count = 500): CategoryDigestData {
  let seed = 42;
  const rand = () => (seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648;
  const m = 40;
  const C = 4.1;
  const raw = Array.from({ length: count }, (_, i) => {
    const n = Math.max(1, Math.round(rand() ** 2 * 600));
    const rawMean = Math.min(5, Math.max(1, 3.2 + rand() * 1.8));
    return { i, n, rawMean, smoothed: (m * C + n * rawMean) / (m + n) };
  });
  const byRaw = [...raw].sort((a, b) => b.rawMean - a.rawMean);
  const bySmooth = [...raw].sort((a, b) => b.smoothed - a.smoothed);
  const naive = new Map(byRaw.map((r, k) => [r.i, k + 1]));
  const items: DigestItem[] = bySmooth.map((r, k) => ({
    sku: `SY-${String(r.i + 1000).padStart(4, '0')}`,
    title: `Synthetic item ${r.i} ${'with a longer name '.repeat(r.i % 4)}`.trim(),
    n: r.n,
    rawMean: r.rawMean,
    smoothed: r.smoothed,
    lowerBound: r.smoothed - 0.2,
    naiveRank: naive.get(r.i)!,
    smoothedRank: k + 1,
    drift: naive.get(r.i)! - (k + 1),
    naiveMovement: Math.round(rand() * 10 - 5),
    smoothedMovement: Math.round(rand() * 10 - 5),
    newestAgeDays: Math.round(rand() * 500),
    medianAgeDays: Math.round(rand() * 700),
    recentShare: rand(),
    oneStarShare: rand() * 0.2,
    stale: rand() < 0.05,
    thin: r.n < 25,
    negativeCluster: r.i % 97 === 0,
    staleReason: null,
    clusterReason: null,
    clusterObserved: 9,
    clusterExpected: 2.1,
    clusterPValue: 0.0004,
    recurringPhrases: [{ phrase: 'stopped working', count: 5 }],
    whatItTakes: 'reviews',
    reviewsToPass: Math.round(rand() * 40),
    aboveSku: 'SY-1000',
    aboveScore: 4.4,
  }));
  const figures = {
    itemCount: count,
    reviewCount: raw.reduce((s, r) => s + r.n, 0),
    meanCount: 150,
    medianCount: 90,
    weightedMean: C,
    spearmanRho: 0.81,
    kendallTauB: 0.64,
    meanAbsDrift: items.reduce((s, i) => s + Math.abs(i.drift), 0) / count,
    maxAbsDrift: Math.max(...items.map((i) => Math.abs(i.drift))),
    topOverlap: { depth: 10, shared: 4, share: 0.4 },
    rbo: { p: 0.9, depth: 500, truncated: 0.3, extrapolated: 0.41 },
    staleCount: items.filter((i) => i.stale).length,
    thinCount: items.filter((i) => i.thin).length,
    negativeClusterCount: items.filter((i) => i.negativeCluster).length,
    previousMatched: count,
    movers: items.slice(0, 30).map((i) => ({ sku: i.sku, naiveMovement: 4, smoothedMovement: -3 })),
  };
  const params = {
    asOf: '2026-11-30T00:00:00.000Z',
    m,
    C,
    z: 1.65,
    priorWeightStrategy: 'mean-count',
    priorWeightApplied: 'mean-count',
    priorMeanStrategy: 'category-mean',
    epv: null,
    vhm: null,
    starShares: null,
    priorVariance: 0.5,
    pooledWithinVariance: null,
    helpfulZ: 1.96,
    halfLifeDays: 180,
    recentWindowDays: 90,
    staleAfterDays: 365,
    thinEvidenceThreshold: 25,
    clusterWindowDays: 90,
    clusterBaselineDays: 365,
    clusterPValue: 0.01,
    clusterMinCount: 3,
    clusterPhrases: ['stopped working'],
    whatItTakesStars: 5,
    moverThreshold: 3,
    topOverlapDepth: 10,
    rboP: 0.9,
    notes: [],
  } as unknown as CategoryDigestData['params'];
  return {
    category: { slug: 'synthetic', name: 'Synthetic Category', description: '' },
    isoWeek: '2026-W48',
    weekStart: '2026-11-23',
    weekEnd: '2026-11-29',
    takenAt: '2026-11-30T00:00:00.000Z',
    generatedAt: '2026-11-30T00:00:00.000Z',
    webUrl: 'http://127.0.0.1:4600/categories/synthetic?week=2026-W48',
    figures,
    params,
    previous: null,
    items,
    story: buildStory({ figures, params, items, previous: null }),
  };
}

/** Renders the digest of a synthetic 500-item category and prints time and peak memory. */
export async function run(): Promise<void> {
  const data = syntheticCategory(500);
  let peak = process.memoryUsage().rss;
  const sampler = setInterval(() => {
    peak = Math.max(peak, process.memoryUsage().rss);
  }, 5);
  await renderCategoryDigest(syntheticCategory(20), 'A4'); // font loading, once per process
  const started = performance.now();
  const { pdf, pages } = await renderCategoryDigest(data, 'A4');
  const ms = performance.now() - started;
  peak = Math.max(peak, process.memoryUsage().rss);
  clearInterval(sampler);
  console.log(
    `digest: 500 items, ${pages} pages, ${(pdf.length / 1024).toFixed(0)} KB in ${ms.toFixed(0)} ms; peak RSS ${(peak / 1024 / 1024).toFixed(0)} MB`,
  );
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) void run();
