import type { CategoryDigestData, PaperSize, PortfolioDigestData } from '../../shared/schemas/digests.schema';
import { countOf } from '../../shared/plural';
import { priorWeightApplied, terms } from '../../shared/vocabulary';
import { bullets, dash, driftChart, heading, int, longDate, note, num, table, tiles } from './blocks';
import { Canvas } from './canvas';
import { buriedItems, keyTiles, thinLeaders, type RenderedPdf } from './category-digest';
import { colours } from './theme';

/** Lines of the portfolio digest's "since last week" list; the full list is in the category's own digest. */
export const shortChangesLimit = 5;

/**
 * The first lines of a category's changes that fit the portfolio digest, and a closing line saying how many
 * more the category digest holds: a list is never cut without saying so.
 */
export function shortChanges(changes: string[], categoryName: string, limit = shortChangesLimit): string[] {
  if (changes.length <= limit) return changes;
  const shown = changes.slice(0, limit - 1);
  return [
    ...shown,
    `And ${countOf(changes.length - shown.length, 'more change')}: the full list is in the ${categoryName} digest.`,
  ];
}

function rhoChange(c: CategoryDigestData): string {
  const now = c.figures.spearmanRho;
  const before = c.previous?.spearmanRho;
  if (now === null || before === null || before === undefined) return dash;
  const d = now - before;
  if (Math.abs(d) < 0.0005) return '0.000';
  return `${d > 0 ? '+' : '\u2212'}${Math.abs(d).toFixed(3)}`;
}

/** Horizontal bars of mean |drift| per category, drawn as vectors. */
function driftBars(c: Canvas, data: PortfolioDigestData): void {
  const rows = data.categories;
  const labelWidth = 150;
  const barWidth = c.width - labelWidth - 50;
  const max = Math.max(1, ...rows.map((r) => r.figures.meanAbsDrift));
  for (const r of rows) {
    c.ensure(18);
    c.text(r.category.name, c.left, c.y + 2, { size: 8.5, width: labelWidth - 8 });
    const w = (r.figures.meanAbsDrift / max) * barWidth;
    c.rect(c.left + labelWidth, c.y + 2, barWidth, 10, colours.ink50);
    c.rect(c.left + labelWidth, c.y + 2, Math.max(1, w), 10, colours.ink700);
    c.text(num(r.figures.meanAbsDrift, 1), c.left + labelWidth + barWidth + 6, c.y + 2, {
      style: 'monoBold',
      size: 8.5,
      width: 40,
    });
    c.y += 17;
  }
  c.y += 4;
}

function categoryPage(c: Canvas, d: CategoryDigestData): void {
  c.newPage();
  heading(c, d.category.name, d.category.description || undefined, 60);
  tiles(c, keyTiles(d));
  const chartTop = c.y + 4;
  const chartSize = 210;
  driftChart(c, d.items, { y: chartTop, size: chartSize, labels: 4 });
  const x = c.left + chartSize + 24;
  const width = c.right - x;
  c.y = chartTop;
  c.text('Smoothed top five', x, c.y, { style: 'bold', size: 9.5 });
  c.y += 15;
  for (const item of d.items.slice(0, 5)) {
    c.text(String(item.smoothedRank), x, c.y, {
      style: 'monoBold',
      size: 8,
      colour: colours.brass700,
      width: 14,
    });
    c.text(item.sku, x + 16, c.y, { style: 'mono', size: 8, width: 62 });
    c.text(item.title, x + 80, c.y, { size: 8, width: width - 80 });
    c.y += 12;
  }
  c.y += 8;
  c.text('Worth a look', x, c.y, { style: 'bold', size: 9.5 });
  c.y += 15;
  const thin = thinLeaders(d)[0];
  const buried = buriedItems(d)[0];
  const cluster = d.items.find((i) => i.negativeCluster);
  const lines = [
    thin
      ? `Thin leader: ${thin.sku}, raw #${thin.naiveRank} on ${countOf(thin.n, 'review')}, smoothed #${thin.smoothedRank}.`
      : 'No leader on thin evidence.',
    buried
      ? `Buried: ${buried.sku}, smoothed #${buried.smoothedRank} but raw #${buried.naiveRank}.`
      : 'Nothing buried by the raw sort.',
    cluster
      ? `Cluster: ${cluster.sku}${cluster.recurringPhrases[0] ? `, "${cluster.recurringPhrases[0].phrase}"` : ''}.`
      : 'No negative cluster.',
    `${countOf(d.figures.staleCount, 'stale item')}; ${countOf(d.figures.movers.length, 'mover')}.`,
  ];
  for (const l of lines) {
    for (const w of c.wrap(l, width, 'regular', 8)) {
      c.text(w, x, c.y, { size: 8 });
      c.y += 11;
    }
    c.y += 3;
  }
  c.y += 5;
  c.text('Scored with', x, c.y, { style: 'bold', size: 9.5 });
  c.y += 15;
  // The strategy that actually set m, fallbacks included, beside m as on every other page that shows m.
  const scoredWith = `Prior weight m = ${num(d.params.m, 1)}, from the ${priorWeightApplied(d.params)}; prior mean C = ${num(d.params.C, 3)}.`;
  for (const w of c.wrap(scoredWith, width, 'regular', 8)) {
    c.text(w, x, c.y, { size: 8 });
    c.y += 11;
  }
  c.y = Math.max(c.y, chartTop + chartSize + 28);
  c.text(d.previous ? `Since ${d.previous.isoWeek}` : 'Since last week', c.left, c.y, {
    style: 'bold',
    size: 9.5,
  });
  c.y += 15;
  bullets(c, shortChanges(d.story.changes, d.category.name), { size: 8.5 });
}

/** Renders the executives' portfolio digest: a cover comparing categories, then one page per category. */
export async function renderPortfolioDigest(
  data: PortfolioDigestData,
  paper: PaperSize,
): Promise<RenderedPdf> {
  const c = new Canvas(paper, {
    title: `Ballast portfolio digest, ${data.isoWeek}`,
    subject: `Naive and smoothed rating rankings across ${countOf(data.categories.length, 'category', 'categories')} for ${data.isoWeek}`,
  });
  const band = 150;
  c.rect(0, 0, c.pageWidth, band, colours.ink);
  c.rect(0, band, c.pageWidth, 4, colours.brass);
  c.text('BALLAST', c.left, 40, { style: 'heavy', size: 11, colour: colours.brass });
  c.text('Portfolio digest', c.left + 66, 40.5, { style: 'medium', size: 10.5, colour: colours.ink100 });
  c.text(`Week ${data.isoWeek}`, c.left, 70, {
    style: 'heavy',
    size: 28,
    colour: colours.white,
    width: c.width,
  });
  c.text(
    `${longDate(data.weekStart)} to ${longDate(data.weekEnd)} · ${countOf(data.categories.length, 'category', 'categories')}`,
    c.left,
    112,
    {
      style: 'medium',
      size: 10,
      colour: colours.ink100,
      width: c.width,
    },
  );
  c.y = band + 24;
  heading(
    c,
    'Categories side by side',
    'Where the raw and smoothed orderings part ways, and where the evidence needs attention.',
    60,
  );
  table(
    c,
    [
      {
        header: 'Category',
        share: 2.6,
        style: 'semibold',
        value: (r: CategoryDigestData) => r.category.name,
      },
      { header: 'Items', share: 0.8, align: 'right', value: (r) => int(r.figures.itemCount) },
      { header: 'Reviews', share: 1, align: 'right', value: (r) => int(r.figures.reviewCount) },
      {
        header: terms.spearmanShort,
        share: 0.8,
        align: 'right',
        value: (r) => num(r.figures.spearmanRho, 3),
      },
      { header: `${terms.spearmanShort} Δ`, share: 0.8, align: 'right', style: 'mono', value: rhoChange },
      { header: terms.kendallShort, share: 0.8, align: 'right', value: (r) => num(r.figures.kendallTauB, 3) },
      {
        header: 'Top 10',
        share: 0.75,
        align: 'right',
        value: (r) => `${r.figures.topOverlap.shared}/${r.figures.topOverlap.depth}`,
      },
      { header: 'Thin', share: 0.6, align: 'right', value: (r) => int(r.figures.thinCount) },
      { header: 'Stale', share: 0.6, align: 'right', value: (r) => int(r.figures.staleCount) },
      {
        header: 'Clusters',
        share: 0.8,
        align: 'right',
        style: 'bold',
        value: (r) => int(r.figures.negativeClusterCount),
        colour: (r) => (r.figures.negativeClusterCount > 0 ? colours.coral : undefined),
      },
    ],
    data.categories,
    { size: 8.5, rowHeight: 17, continued: 'Categories side by side' },
  );
  c.text('Mean |drift| by category (places an item moves between the orderings)', c.left, c.y + 4, {
    style: 'bold',
    size: 9.5,
  });
  c.y += 22;
  driftBars(c, data);
  c.text('The week across the portfolio', c.left, c.y + 4, { style: 'heavy', size: 13 });
  c.y += 24;
  bullets(c, data.story, { size: 9.5 });
  const biggest = data.categories
    .flatMap((d) => d.figures.movers.map((m) => ({ d, m })))
    .sort((a, b) => Math.abs(b.m.smoothedMovement) - Math.abs(a.m.smoothedMovement))[0];
  if (biggest) {
    note(
      c,
      `Largest weekly move by smoothed score: ${biggest.m.sku} in ${biggest.d.category.name}, ${biggest.m.smoothedMovement > 0 ? 'up' : 'down'} ${countOf(Math.abs(biggest.m.smoothedMovement), 'place')}.`,
    );
  }

  c.onNewPage = (cv) => {
    cv.text('BALLAST', cv.left, 30, { style: 'heavy', size: 7.5, colour: colours.brass700 });
    cv.text(`Portfolio digest · ${data.isoWeek}`, cv.left + 48, 30, {
      style: 'semibold',
      size: 7.5,
      colour: colours.ink500,
    });
    cv.rule(44, colours.ink100);
  };
  for (const d of data.categories) categoryPage(c, d);

  return c.finish((cv, page, pages) => {
    const y = cv.pageHeight - 34;
    cv.rule(y - 6, colours.ink100);
    cv.text(
      'Scores are estimates from public ratings, not verdicts on a product or a reviewer. A negative cluster is a reason to read the reviews.',
      cv.left,
      y,
      { size: 6.8, colour: colours.ink500, width: cv.width - 80 },
    );
    cv.text(`Page ${page} of ${pages}`, cv.right - 70, y, {
      style: 'semibold',
      size: 7,
      colour: colours.ink500,
      width: 70,
      align: 'right',
    });
  });
}
