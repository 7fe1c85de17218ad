import { countOf } from '../../shared/plural';
import type { CategoryDigestData, DigestItem, PaperSize } from '../../shared/schemas/digests.schema';
import { priorWeightApplied, rankWords, standingsColumns as label, terms } from '../../shared/vocabulary';
import {
  bullets,
  dash,
  driftChart,
  flags,
  heading,
  int,
  legend,
  longDate,
  note,
  num,
  pct,
  pValue,
  signed,
  table,
  tiles,
  type Column,
  type Tile,
} from './blocks';
import { Canvas } from './canvas';
import { rankedWithRanges, rankIntervalBars } from './rank-intervals';
import { colours } from './theme';

export type RenderedPdf = { pdf: Buffer; pages: number };

/** Items of the raw sort's top places that rest on thin evidence. */
export function thinLeaders(data: CategoryDigestData): DigestItem[] {
  const depth = Math.max(20, Math.ceil(data.items.length * 0.1));
  return data.items
    .filter((i) => i.thin && i.naiveRank <= depth)
    .sort((a, b) => a.naiveRank - b.naiveRank)
    .slice(0, 12);
}

/** Well-reviewed items the smoothed ordering places high and the raw sort at least five places lower. */
export function buriedItems(data: CategoryDigestData): DigestItem[] {
  const depth = Math.max(25, Math.ceil(data.items.length * 0.1));
  return data.items
    .filter((i) => i.drift >= 5 && i.smoothedRank <= depth && !i.thin)
    .sort((a, b) => a.smoothedRank - b.smoothedRank || b.drift - a.drift)
    .slice(0, 10);
}

export function justOutside(data: CategoryDigestData): DigestItem[] {
  return data.items.slice(10, 15);
}

function deltaNote(
  now: number | null,
  before: number | null | undefined,
  digits: number,
  lowerIsBetter = false,
) {
  if (now === null || before === null || before === undefined) return undefined;
  const d = now - before;
  if (Math.abs(d) < 10 ** -digits / 2)
    return { note: 'unchanged since last week', noteColour: colours.ink500 };
  const better = lowerIsBetter ? d < 0 : d > 0;
  const text = `${d > 0 ? '+' : '\u2212'}${Math.abs(d).toFixed(digits)} since last week`;
  return { note: text, noteColour: better ? colours.kelp : colours.coral };
}

export function keyTiles(data: CategoryDigestData): Tile[] {
  const f = data.figures;
  const p = data.previous;
  return [
    { label: 'Items ranked', value: int(f.itemCount), ...deltaNote(f.itemCount, p?.itemCount, 0) },
    { label: 'Reviews counted', value: int(f.reviewCount), ...deltaNote(f.reviewCount, p?.reviewCount, 0) },
    { label: terms.spearman, value: num(f.spearmanRho, 3), ...deltaNote(f.spearmanRho, p?.spearmanRho, 3) },
    { label: terms.kendall, value: num(f.kendallTauB, 3), ...deltaNote(f.kendallTauB, p?.kendallTauB, 3) },
    {
      label: 'Mean drift (places)',
      value: num(f.meanAbsDrift, 1),
      ...deltaNote(f.meanAbsDrift, p?.meanAbsDrift, 1, true),
    },
    {
      label: 'Largest drift',
      value: int(f.maxAbsDrift),
      ...deltaNote(f.maxAbsDrift, p?.maxAbsDrift, 0, true),
    },
    {
      label: `Top ${f.topOverlap.depth} shared`,
      value: `${f.topOverlap.shared} of ${f.topOverlap.depth}`,
      note: `RBO ${num(f.rbo.extrapolated, 3)} (p = ${f.rbo.p})`,
    },
    {
      label: label.flags.label,
      value: `${f.thinCount} · ${f.staleCount} · ${f.negativeClusterCount}`,
      note: 'thin · stale · negative clusters',
    },
  ];
}

type Section = { title: string; page: number };

function cover(c: Canvas, data: CategoryDigestData): void {
  const band = 178;
  c.rect(0, 0, c.pageWidth, band, colours.ink);
  c.rect(0, band, c.pageWidth, 4, colours.brass);
  c.text('BALLAST', c.left, 40, { style: 'heavy', size: 11, colour: colours.brass });
  c.text('Weekly ratings digest', c.left + 66, 40.5, { style: 'medium', size: 10.5, colour: colours.ink100 });
  c.text(data.category.name, c.left, 70, { style: 'heavy', size: 28, colour: colours.white, width: c.width });
  c.text(`Week ${data.isoWeek}`, c.left, 116, { style: 'bold', size: 13, colour: colours.brass300 });
  c.text(`${longDate(data.weekStart)} to ${longDate(data.weekEnd)}`, c.left, 136, {
    style: 'medium',
    size: 10,
    colour: colours.ink100,
    width: c.width,
  });
  c.text(`Snapshot taken ${data.takenAt.slice(0, 16).replace('T', ' ')} UTC`, c.left, 151, {
    size: 8.5,
    colour: colours.ink300,
    width: c.width,
  });
  c.y = band + 24;
  tiles(c, keyTiles(data));
  c.y += 6;
  c.text('The week in brief', c.left, c.y, { style: 'heavy', size: 13 });
  c.y += 20;
  bullets(c, data.story.headline, { size: 9.5 });
  c.y += 6;
  c.text(data.previous ? `What changed since ${data.previous.isoWeek}` : 'What changed', c.left, c.y, {
    style: 'heavy',
    size: 13,
  });
  c.y += 20;
  bullets(c, data.story.changes, { size: 9.5 });
}

function contents(c: Canvas, sections: Section[]): void {
  const rows = Math.ceil(sections.length / 2);
  const h = 26 + rows * 14;
  const y = c.bottom - h;
  c.rect(c.left, y, c.width, h, colours.paper);
  c.text('IN THIS DIGEST', c.left + 12, y + 9, { style: 'bold', size: 7, colour: colours.ink500 });
  const colWidth = (c.width - 24) / 2;
  sections.forEach((s, i) => {
    const col = Math.floor(i / rows);
    const row = i % rows;
    const x = c.left + 12 + col * (colWidth + 12);
    const ly = y + 24 + row * 14;
    c.text(s.title, x, ly, { size: 8.5, width: colWidth - 40 });
    c.text(String(s.page), x + colWidth - 36, ly, {
      style: 'monoBold',
      size: 8.5,
      colour: colours.brass700,
      width: 24,
      align: 'right',
    });
  });
}

function itemCell(): Column<DigestItem>[] {
  return [
    { header: label.sku.label, share: 1.15, style: 'mono', value: (i) => i.sku },
    { header: label.title.label, share: 3.4, value: (i) => i.title || dash },
  ];
}

/** Renders one category's weekly digest as a PDF. */
export async function renderCategoryDigest(data: CategoryDigestData, paper: PaperSize): Promise<RenderedPdf> {
  const c = new Canvas(paper, {
    title: `Ballast digest: ${data.category.name}, ${data.isoWeek}`,
    subject: `Naive and smoothed rating rankings of ${data.category.name} for ${data.isoWeek}`,
  });
  const sections: Section[] = [];
  const pageNow = (): number => c.doc.bufferedPageRange().count;
  const section = (title: string, lead?: string, keep?: number): void => {
    heading(c, title, lead, keep);
    sections.push({ title, page: pageNow() });
  };
  const f = data.figures;
  const v = data.params.whatItTakesStars;

  cover(c, data);
  c.onNewPage = (cv) => runningHeader(cv, data);

  c.newPage();
  section(
    'Naive and smoothed ranks',
    `Each dot is one of the ${f.itemCount} items: across, its place when sorted by raw mean; down, its place by the smoothed score (Bayesian average with m = ${num(data.params.m, 1)} and C = ${num(data.params.C, 3)}). Dots on the dashed line rank the same either way.`,
  );
  const chartSize = Math.min(c.width - 150, c.bottom - c.y - 120);
  const chartTop = c.y;
  driftChart(c, data.items, { size: chartSize, labels: 7 });
  legend(c, c.left + chartSize + 16, chartTop + 4);
  const summaryX = c.left + chartSize + 16;
  const summaryY = chartTop + 90;
  c.y = summaryY;
  const largest = [...data.items].sort((a, b) => Math.abs(b.drift) - Math.abs(a.drift)).slice(0, 6);
  c.text('Largest drifts', summaryX, c.y, { style: 'bold', size: 9 });
  c.y += 15;
  for (const item of largest) {
    c.text(item.sku, summaryX, c.y, { style: 'mono', size: 7.5, width: c.right - summaryX - 34 });
    c.text(signed(item.drift), c.right - 30, c.y, {
      style: 'monoBold',
      size: 7.5,
      width: 30,
      align: 'right',
      colour: item.drift > 0 ? colours.kelp : colours.coral,
    });
    c.y += 11;
  }
  c.y = chartTop + chartSize + 30;
  note(
    c,
    `Spearman's rho ${num(f.spearmanRho, 3)} and Kendall's tau-b ${num(f.kendallTauB, 3)} measure how far the two orderings agree (1 is identical). On average an item moves ${num(f.meanAbsDrift, 1)} places; the largest move is ${countOf(f.maxAbsDrift, 'place')}. ${f.topOverlap.shared} of the top ${f.topOverlap.depth} are the same in both.`,
  );

  const thin = thinLeaders(data);
  section(
    'Leaders on thin evidence',
    `Items near the top of the raw sort with fewer than ${num(data.params.thinEvidenceThreshold, 1)} reviews. A few glowing reviews make a high raw mean; the smoothed score asks for more before it agrees.`,
  );
  if (thin.length === 0) note(c, 'No leader of the raw sort rests on thin evidence this week.');
  else
    table(
      c,
      [
        ...itemCell(),
        { header: label.n.label, share: 0.8, align: 'right', value: (i) => int(i.n) },
        { header: label.rawMean.label, share: 0.85, align: 'right', value: (i) => num(i.rawMean) },
        { header: label.smoothed.label, share: 0.85, align: 'right', value: (i) => num(i.smoothed, 3) },
        { header: label.naiveRank.label, share: 0.8, align: 'right', value: (i) => int(i.naiveRank) },
        {
          header: label.smoothedRank.label,
          share: 1,
          align: 'right',
          style: 'bold',
          value: (i) => int(i.smoothedRank),
        },
      ],
      thin,
      { continued: 'Leaders on thin evidence' },
    );

  const buried = buriedItems(data);
  section(
    'Buried by the raw sort',
    'Items with enough reviews that the smoothed score places high but a sort by raw mean pushes at least five places down the list.',
  );
  if (buried.length === 0) note(c, 'No well-reviewed item is held down by the raw sort this week.');
  else
    table(
      c,
      [
        ...itemCell(),
        { header: label.n.label, share: 0.8, align: 'right', value: (i) => int(i.n) },
        { header: label.rawMean.label, share: 0.85, align: 'right', value: (i) => num(i.rawMean) },
        { header: label.naiveRank.label, share: 0.8, align: 'right', value: (i) => int(i.naiveRank) },
        {
          header: label.smoothedRank.label,
          share: 1,
          align: 'right',
          style: 'bold',
          value: (i) => int(i.smoothedRank),
        },
        {
          header: label.drift.label,
          share: 0.7,
          align: 'right',
          style: 'monoBold',
          colour: () => colours.kelp,
          value: (i) => signed(i.drift),
        },
      ],
      buried,
      { continued: 'Buried by the raw sort' },
    );

  const stale = data.items.filter((i) => i.stale).sort((a, b) => a.smoothedRank - b.smoothedRank);
  section(
    'Stale evidence',
    `Items whose newest review is older than ${int(data.params.staleAfterDays)} days. Their score describes a product as it was; ask whether it still sells as reviewed.`,
  );
  if (stale.length === 0) note(c, 'Every item has a review newer than the staleness threshold.');
  else {
    table(
      c,
      [
        ...itemCell(),
        { header: 'Newest (d)', share: 1, align: 'right', value: (i) => int(i.newestAgeDays) },
        { header: 'Median (d)', share: 1, align: 'right', value: (i) => int(i.medianAgeDays) },
        {
          header: `Last ${data.params.recentWindowDays} d`,
          share: 0.85,
          align: 'right',
          value: (i) => pct(i.recentShare),
        },
        {
          header: label.smoothedRank.label,
          share: 1,
          align: 'right',
          style: 'bold',
          value: (i) => int(i.smoothedRank),
        },
      ],
      stale.slice(0, 15),
      { continued: 'Stale evidence' },
    );
    if (stale.length > 15) note(c, `${stale.length - 15} more stale items are marked in the full standings.`);
  }

  const clusters = data.items
    .filter((i) => i.negativeCluster)
    .sort((a, b) => (a.clusterPValue ?? 1) - (b.clusterPValue ?? 1));
  section(
    'Negative clusters',
    `One-star reviews in the last ${data.params.clusterWindowDays} days far above the item's own baseline of the ${data.params.clusterBaselineDays} days before (one-sided test, p below ${data.params.clusterPValue}, at least ${data.params.clusterMinCount} such reviews). A reason to read the reviews, not proof of a defect.`,
  );
  if (clusters.length === 0) note(c, 'No item shows an unusual burst of one-star reviews this week.');
  for (const item of clusters.slice(0, 8)) {
    const phrases = item.recurringPhrases.length
      ? item.recurringPhrases.map((p) => `"${p.phrase}" (${p.count})`).join(', ')
      : 'none of the watched phrases';
    const lines = c.wrap(`Recurring phrases: ${phrases}`, c.width - 24, 'regular', 8.5);
    const h = 40 + lines.length * 12;
    c.ensure(h + 6);
    c.rect(c.left, c.y, c.width, h, colours.coral100);
    c.rect(c.left, c.y, 3, h, colours.coral);
    c.text(item.sku, c.left + 12, c.y + 8, { style: 'monoBold', size: 8.5, width: 90 });
    c.text(item.title, c.left + 100, c.y + 8, { style: 'bold', size: 9, width: c.width - 112 });
    c.text(
      `${int(item.clusterObserved)} one-star reviews in the window where about ${num(item.clusterExpected, 1)} were expected · p ${pValue(item.clusterPValue)} · smoothed rank ${item.smoothedRank}`,
      c.left + 12,
      c.y + 22,
      { size: 8.5, colour: colours.ink700, width: c.width - 24 },
    );
    let ly = c.y + 36;
    for (const l of lines) {
      c.text(l, c.left + 12, ly, { size: 8.5, style: 'medium', width: c.width - 24 });
      ly += 12;
    }
    c.y += h + 6;
  }

  const bySku = new Map(data.items.map((i) => [i.sku, i]));
  section(
    data.previous ? `Movers since ${data.previous.isoWeek}` : 'Movers',
    `Items whose place changed by at least ${data.params.moverThreshold} in either ordering since the week before.`,
  );
  if (!data.previous)
    note(c, 'This is the first snapshot of the category, so there is nothing to compare with yet.');
  else if (f.movers.length === 0) note(c, 'No item moved by the mover threshold this week.');
  else
    table(
      c,
      [
        { header: label.sku.label, share: 1.15, style: 'mono', value: (m) => m.sku },
        { header: label.title.label, share: 3.2, value: (m) => bySku.get(m.sku)?.title ?? dash },
        {
          header: label.naiveMovement.label,
          share: 1.05,
          align: 'right',
          style: 'monoBold',
          value: (m) => signed(m.naiveMovement),
          colour: (m) =>
            m.naiveMovement > 0 ? colours.kelp : m.naiveMovement < 0 ? colours.coral : undefined,
        },
        {
          header: label.smoothedMovement.label,
          share: 1.05,
          align: 'right',
          style: 'monoBold',
          value: (m) => signed(m.smoothedMovement),
          colour: (m) =>
            m.smoothedMovement > 0 ? colours.kelp : m.smoothedMovement < 0 ? colours.coral : undefined,
        },
        {
          header: label.smoothedRank.label,
          share: 1,
          align: 'right',
          value: (m) => int(bySku.get(m.sku)?.smoothedRank),
        },
      ],
      f.movers.slice(0, 20),
      { continued: 'Movers' },
    );

  section(
    'What it would take',
    `For the items just outside the top ten: the fewest new ${v}-star reviews that lift each above the item ranked just above it, holding m and C fixed.`,
  );
  table(
    c,
    [
      ...itemCell(),
      {
        header: label.smoothedRank.label,
        share: 0.8,
        align: 'right',
        style: 'bold',
        value: (i) => int(i.smoothedRank),
      },
      { header: label.smoothed.label, share: 0.85, align: 'right', value: (i) => num(i.smoothed, 3) },
      { header: 'To pass', share: 1.1, style: 'mono', value: (i) => i.aboveSku ?? dash },
      {
        header: `${v}-star reviews needed`,
        share: 1.5,
        align: 'right',
        style: 'bold',
        value: (i) =>
          i.whatItTakes === 'reviews' && i.reviewsToPass !== null
            ? int(i.reviewsToPass)
            : i.whatItTakes === 'impossible'
              ? `not reachable at ${v} stars`
              : dash,
      },
    ],
    justOutside(data),
    { continued: 'What it would take' },
  );

  const ranged = rankedWithRanges(data);
  if (ranged.length > 0) {
    c.newPage();
    section(
      rankWords.pdfTitle,
      `The top ${ranged.length} items by smoothed score. ${rankWords.meaning(data.rankLevel ?? 0.9)} Where two bars overlap, the order of the two items is not settled by the evidence (Goldstein & Spiegelhalter 1996).`,
    );
    rankIntervalBars(c, ranged);
  }

  c.newPage();
  section(
    'Full standings',
    `All ${f.itemCount} items by smoothed score. Lower bound: the posterior mean minus z = ${num(data.params.z, 2)} standard deviations. Drift: naive rank minus smoothed rank.`,
  );
  table(
    c,
    [
      {
        header: label.smoothedRank.label,
        share: 1.1,
        align: 'right',
        style: 'bold',
        value: (i) => int(i.smoothedRank),
      },
      { header: label.sku.label, share: 1.05, style: 'mono', value: (i) => i.sku },
      { header: label.title.label, share: 2.0, value: (i) => i.title || dash },
      { header: label.n.label, share: 0.75, align: 'right', value: (i) => int(i.n) },
      { header: label.rawMean.label, share: 0.95, align: 'right', value: (i) => num(i.rawMean) },
      { header: label.smoothed.label, share: 0.95, align: 'right', value: (i) => num(i.smoothed, 3) },
      { header: label.lowerBound.label, share: 1.1, align: 'right', value: (i) => num(i.lowerBound, 3) },
      { header: label.naiveRank.label, share: 0.85, align: 'right', value: (i) => int(i.naiveRank) },
      {
        header: label.drift.label,
        share: 0.6,
        align: 'right',
        style: 'mono',
        value: (i) => signed(i.drift),
        colour: (i) => (i.drift > 0 ? colours.kelp : i.drift < 0 ? colours.coral : undefined),
      },
      { header: label.flags.label, share: 0.9, value: flags, colour: () => colours.brass700 },
    ],
    data.items,
    { size: 7.5, rowHeight: 13, continued: 'Full standings' },
  );

  c.newPage();
  section(
    'Methods and parameters',
    'Every number in this digest can be reproduced from these values and the reviews as of the cut-off.',
  );
  methods(c, data);

  contentsOnCover(c, sections);
  return c.finish((cv, page, pages) => footer(cv, data, page, pages));
}

function contentsOnCover(c: Canvas, sections: Section[]): void {
  c.doc.switchToPage(0);
  contents(c, sections);
}

function runningHeader(c: Canvas, data: CategoryDigestData): void {
  c.text('BALLAST', c.left, 30, { style: 'heavy', size: 7.5, colour: colours.brass700 });
  c.text(`${data.category.name} · ${data.isoWeek}`, c.left + 48, 30, {
    style: 'semibold',
    size: 7.5,
    colour: colours.ink500,
    width: c.width - 48,
  });
  c.rule(44, colours.ink100);
}

function footer(c: Canvas, data: CategoryDigestData, page: number, pages: number): void {
  const y = c.pageHeight - 34;
  c.rule(y - 6, colours.ink100);
  c.text(
    `Generated ${data.generatedAt.slice(0, 10)} · estimates from public ratings, not verdicts`,
    c.left,
    y,
    {
      size: 7,
      colour: colours.ink500,
      width: c.width - 90,
    },
  );
  c.text(`Page ${page} of ${pages}`, c.right - 90, y, {
    style: 'semibold',
    size: 7,
    colour: colours.ink500,
    width: 90,
    align: 'right',
  });
}

export function methodRows(data: CategoryDigestData): [string, string][] {
  const p = data.params;
  return [
    ['Prior weight m', `${num(p.m, 3)}, from the ${priorWeightApplied(p)}`],
    ['Prior mean C', `${num(p.C, 4)} (strategy: ${p.priorMeanStrategy})`],
    [
      'Bühlmann EPV / VHM',
      p.epv !== null && p.vhm !== null
        ? `${num(p.epv, 4)} / ${num(p.vhm, 4)}`
        : 'not estimable for this category',
    ],
    ['Lower bound z', num(p.z, 2)],
    ['Recency half-life', `${num(p.halfLifeDays, 0)} days`],
    ['Recent window', `${p.recentWindowDays} days`],
    ['Stale after', `${p.staleAfterDays} days without a new review`],
    ['Thin evidence below', `${num(p.thinEvidenceThreshold, 1)} reviews`],
    [
      'Negative cluster window',
      `${p.clusterWindowDays} days against the ${p.clusterBaselineDays} days before`,
    ],
    ['Negative cluster test', `p below ${p.clusterPValue}, at least ${p.clusterMinCount} one-star reviews`],
    ['Watched phrases', p.clusterPhrases.length ? p.clusterPhrases.join(', ') : 'none configured'],
    ['Helpfulness weight', `Wilson lower bound, z = ${num(p.helpfulZ, 2)}`],
    ['What it would take', `new reviews at ${p.whatItTakesStars} stars`],
    ['Mover threshold', `${p.moverThreshold} places`],
    ['Top overlap depth', `${p.topOverlapDepth}`],
    ['Rank-biased overlap', `p = ${p.rboP}`],
    ['Computed as of', p.asOf.slice(0, 16).replace('T', ' ') + ' UTC'],
  ];
}

function methods(c: Canvas, data: CategoryDigestData): void {
  table(
    c,
    [
      { header: 'Parameter', share: 1.3, style: 'semibold', value: (r: [string, string]) => r[0] },
      { header: 'Value used this week', share: 3, value: (r: [string, string]) => r[1] },
    ],
    methodRows(data),
    { size: 8.5, rowHeight: 16 },
  );
  c.text('How the numbers are made', c.left, c.y, { style: 'bold', size: 10.5 });
  c.y += 16;
  bullets(
    c,
    [
      'Raw mean: the sum of stars over the number of reviews. The naive rank sorts by it.',
      'Smoothed score (Bayesian average): (m × C + n × raw mean) / (m + n), the raw mean pulled towards C with the weight of m reviews. The smoothed rank sorts by it.',
      `${terms.ties} Rank correlations use average ranks for ties.`,
      'Drift is the naive rank minus the smoothed rank: above zero when smoothing lifts an item. Rank-biased overlap follows Webber, Moffat and Zobel (2010).',
      'What it would take: the smallest k with (m × C + n × r + v × k) / (m + n + k) above the next item’s score.',
      ...data.params.notes,
    ],
    { size: 8.5 },
  );
  c.y += 6;
  const caution = [
    'Scores are estimates from public ratings, not verdicts on a product or a reviewer.',
    'A negative cluster is a reason to read the reviews, not proof of a defect or of manipulation.',
    'Reviewer identifiers are personal data: Ballast stores only what the job needs and never shows them in digests. Follow your company’s policy and local law.',
  ];
  const lines = caution.flatMap((t) => c.wrap(t, c.width - 28, 'regular', 8.5));
  const h = 30 + lines.length * 12.5 + caution.length * 3;
  c.ensure(h);
  c.rect(c.left, c.y, c.width, h, colours.brass100);
  c.rect(c.left, c.y, 4, h, colours.brass);
  c.text('Read with care', c.left + 14, c.y + 10, { style: 'bold', size: 10 });
  let y = c.y + 28;
  for (const t of caution) {
    for (const l of c.wrap(t, c.width - 28, 'regular', 8.5)) {
      c.text(l, c.left + 14, y, { size: 8.5 });
      y += 12.5;
    }
    y += 3;
  }
  c.y += h + 6;
}
