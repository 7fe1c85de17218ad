import { execFileSync } from 'node:child_process';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rankWords } from '../../../shared/vocabulary';
import { lastCompletedIsoWeek } from '../../../shared/iso-week';
import { Category, Digest } from '../../../server/db/models';
import { demoStory } from '../../../server/demo/scenario';
import {
  loadCategoryDigestData,
  loadPortfolioDigestData,
  portfolioStory,
  produceDigests,
} from '../../../server/modules/digests/digests.service';
import { buildStory, moverClarity } from '../../../server/modules/digests/digest-story';
import { renderCategoryDigest } from '../../../templates/pdf/category-digest';
import { priorWeightStrategyNames } from '../../../shared/vocabulary';
import { num } from '../../../templates/pdf/blocks';
import { renderPortfolioDigest } from '../../../templates/pdf/portfolio-digest';
import { testDemoAsOf } from '../../helpers/demo-data';
import { setupTestApp, type TestApp } from '../../helpers/test-app';
import { demoWithSnapshots } from './demo-weeks';
import { pdfPages, saveArtefacts } from './pdf-text';

const week = lastCompletedIsoWeek(testDemoAsOf);
let t: TestApp;
beforeAll(async () => {
  t = await setupTestApp();
  await demoWithSnapshots(3);
}, 180_000);
afterAll(async () => t.close());

async function categoryId(slug: string): Promise<number> {
  return (await Category.findOne({ where: { slug } }))!.id;
}

describe('category digest PDF', () => {
  it('says the true tie rule, the strategy that set m and the vocabulary words on the methods page', async () => {
    const data = await loadCategoryDigestData(await categoryId('portable-power'), week, testDemoAsOf);
    data.params = { ...data.params, priorWeightStrategy: 'credibility', priorWeightApplied: 'total' };
    const { pdf } = await renderCategoryDigest(data, 'A4');
    saveArtefacts('portable-power-methods', pdf, 99);
    const all = (await pdfPages(pdf)).join('\n').replace(/\s+/g, ' ');
    expect(all).toContain('tied scores share a rank');
    expect(all).toContain('that order does not change the rank');
    expect(all).not.toContain('ties are broken by');
    expect(all).toContain('total review count, a fallback: credibility could not be estimated');
    expect(all).toContain("Spearman's rho");
    expect(all).not.toMatch(/Spearman rho|\bScore\b/);
  });

  it('renders every section of the Portable Power digest with the figures of the snapshot', async () => {
    const data = await loadCategoryDigestData(await categoryId('portable-power'), week, testDemoAsOf);
    const { pdf, pages } = await renderCategoryDigest(data, 'A4');
    saveArtefacts('portable-power-a4', pdf, 4);
    const text = await pdfPages(pdf);
    expect(text.length).toBe(pages);
    const all = text.join('\n');
    const first = text[0]!;
    expect(first).toContain('Portable Power');
    expect(first).toContain(`Week ${week}`);
    expect(first).toContain(data.figures.reviewCount.toLocaleString('en-GB'));
    expect(first).toContain(data.figures.spearmanRho!.toFixed(3));
    expect(first).toContain('The week in brief');
    expect(first).toContain(`What changed since ${data.previous!.isoWeek}`);
    for (const title of [
      'Naive and smoothed ranks',
      'Leaders on thin evidence',
      'Buried by the raw sort',
      'Stale evidence',
      'Negative clusters',
      'Movers since',
      'What it would take',
      'Full standings',
      'Methods and parameters',
      'Read with care',
    ]) {
      expect(all, title).toContain(title);
    }
    expect(all).toContain(demoStory.negativeBurst.sku);
    expect(all).toContain('"battery swelled"');
    expect(all).toContain(`Page ${pages} of ${pages}`);
    const methods = text[pages - 1]!;
    expect(methods).toContain(data.params.m.toFixed(3));
    expect(methods).toContain(data.params.C.toFixed(4));
    expect(methods).toContain(`${data.params.staleAfterDays} days without a new review`);
    expect(methods).toContain(`${data.params.halfLifeDays} days`);
    // every item appears once in the standings, whose header row repeats on each of its pages
    for (const item of data.items) expect(all).toContain(item.sku);
    const standingsPages = text.slice(1).filter((p) => p.includes('Full standings'));
    expect(standingsPages.length).toBeGreaterThan(1);
    for (const p of standingsPages)
      expect(p).toMatch(/Smoothed # SKU Item Reviews Raw mean Smoothed Lower bound Naive #/);
    // reviewer identifiers of the demo look like rv-000123: none may appear
    expect(all).not.toMatch(/rv-\d{6}/);
  });

  it('shows the thin leader, the buried item and the stale item of the demo in their sections', async () => {
    const checks: [string, string, string][] = [
      ['thinLeader', 'Leaders on thin evidence', 'Buried by the raw sort'],
      ['buriedStrong', 'Buried by the raw sort', 'Stale evidence'],
      ['staleItem', 'Stale evidence', 'Negative clusters'],
    ];
    for (const [key, from, to] of checks) {
      const story = demoStory[key as keyof typeof demoStory];
      const category = await Category.findOne({ where: { slug: story.category } });
      const data = await loadCategoryDigestData(category!.id, week, testDemoAsOf);
      const all = (await pdfPages((await renderCategoryDigest(data, 'A4')).pdf)).slice(1).join('\n');
      const section = all.slice(all.indexOf(from), all.indexOf(to));
      expect(section, `${key} in ${from}`).toContain(story.sku);
    }
  });

  it('lays out a US Letter digest on Letter pages', async () => {
    const data = await loadCategoryDigestData(await categoryId('kettles-and-brewers'), week, testDemoAsOf);
    const { pdf } = await renderCategoryDigest(data, 'LETTER');
    saveArtefacts('kettles-letter', pdf, 2);
    expect(pdf.toString('latin1')).toMatch(/\/MediaBox \[0 0 612 792\]/);
  });

  it('keeps hostile and very long titles and titles in other scripts inside their cells', async () => {
    const data = await loadCategoryDigestData(await categoryId('portable-power'), week, testDemoAsOf);
    const long = `Ultra ${'long '.repeat(60)}`.trim().slice(0, 300);
    expect([...long].length).toBe(300);
    data.items[0] = { ...data.items[0]!, title: '<script>alert(1)</script>' };
    data.items[1] = { ...data.items[1]!, title: long };
    data.items[2] = { ...data.items[2]!, title: 'Électrique bouilloire Ōsaka – Łódź édition ñ' };
    data.items[3] = { ...data.items[3]!, title: 'Чайник электрический · Ηλεκτρικός βραστήρας' };
    data.items[4] = { ...data.items[4]!, title: '電気ケトル 1.7L · غلاية كهربائية · קומקום' };
    data.items[5] = { ...data.items[5]!, title: 'קומקום חשמלי 1.7 ליטר' };
    data.items[6] = { ...data.items[6]!, title: 'Travel kettle غلاية كهربائية 1.7L' };
    const { pdf, pages } = await renderCategoryDigest(data, 'A4');
    saveArtefacts('hostile-titles', pdf, 8);
    const all = (await pdfPages(pdf)).join('\n');
    expect(all).toContain('<script>alert(1)</script>');
    expect(all).toContain('Ultra long long');
    expect(all).not.toContain(long);
    expect(all).toMatch(/Ultra long[ a-z]*…/);
    expect(all).toContain('Łódź');
    expect(all).toContain('Чайник');
    expect(all).toContain('Ηλεκτρικός');
    expect(all).toContain('1.7L');
    // Hebrew and Arabic are drawn in their own fonts (Noto Sans), each word right to left.
    expect(all).toContain('קומקום');
    expect(all).toContain('חשמלי');
    // the standings still fit the same number of rows per page as with plain titles
    const plain = await loadCategoryDigestData(await categoryId('portable-power'), week, testDemoAsOf);
    expect(pages).toBe((await renderCategoryDigest(plain, 'A4')).pages);
  });
});

describe('portfolio digest PDF', () => {
  it('opens with a cover comparing every category and gives each its own page', async () => {
    const data = await loadPortfolioDigestData(week, null, testDemoAsOf);
    const { pdf, pages } = await renderPortfolioDigest(data, 'A4');
    saveArtefacts('portfolio-a4', pdf, 3);
    const text = await pdfPages(pdf);
    expect(pages).toBe(1 + data.categories.length);
    expect(text[0]).toContain('Categories side by side');
    for (const [i, c] of data.categories.entries()) {
      expect(text[0]).toContain(c.category.name);
      expect(text[i + 1]).toContain(c.category.name);
      expect(text[i + 1]).toContain(c.figures.spearmanRho!.toFixed(3));
    }
  });

  it('shows beside m the strategy that set it on each category page, fallbacks included', async () => {
    const data = await loadPortfolioDigestData(week, null, testDemoAsOf);
    const fallen = data.categories[0]!;
    fallen.params = { ...fallen.params, priorWeightStrategy: 'credibility', priorWeightApplied: 'total' };
    const { pdf } = await renderPortfolioDigest(data, 'A4');
    saveArtefacts('portfolio-m-strategy', pdf, 2);
    const text = (await pdfPages(pdf)).map((t) => t.replace(/\s+/g, ' '));
    expect(text[1]).toContain(
      `Prior weight m = ${num(fallen.params.m, 1)}, from the total review count, a fallback: credibility could not be estimated`,
    );
    for (const [i, c] of data.categories.entries()) {
      if (i === 0) continue;
      // The demo's categories ask for the mean review count and get it.
      expect(c.params.priorWeightApplied).toBe(c.params.priorWeightStrategy);
      expect(text[i + 1]).toContain(
        `Prior weight m = ${num(c.params.m, 1)}, from the ${priorWeightStrategyNames[c.params.priorWeightApplied]};`,
      );
    }
  });
});

describe('portfolio digest PDF, long lists and counts of one', () => {
  it('keeps the largest rise and fall, says how many changes it left out and counts one category right', async () => {
    const data = await loadPortfolioDigestData(week, null, testDemoAsOf);
    const d = data.categories.find((c) => c.category.slug === 'portable-power')!;
    const prev = d.previous!;
    // A week with many changes: a top ten that turned over, every flag count moved, a rise and a fall.
    const [a, b] = d.items;
    d.figures = {
      ...d.figures,
      movers: [
        { sku: a!.sku, naiveMovement: 3, smoothedMovement: 7 },
        { sku: b!.sku, naiveMovement: -2, smoothedMovement: -9 },
      ],
    };
    d.previous = {
      ...prev,
      topTen: ['NOT-IN-TOP-TEN'],
      thinCount: d.figures.thinCount + 1,
      staleCount: d.figures.staleCount + 1,
      clusterCount: d.figures.negativeClusterCount + 1,
    };
    d.story = buildStory({ figures: d.figures, params: d.params, items: d.items, previous: d.previous });
    const changes = d.story.changes;
    expect(changes.length).toBeGreaterThan(6);
    const one = { ...data, categories: [d], story: portfolioStory([d]) };
    const { pdf } = await renderPortfolioDigest(one, 'A4');
    saveArtefacts('portfolio-long-changes', pdf, 2);
    const [cover, page] = (await pdfPages(pdf)).map((t) => t.replace(/\s+/g, ' '));
    expect(cover).toContain('· 1 category');
    expect(cover).not.toMatch(/\b1 categories\b/);
    expect(cover).toContain('1 category, ');
    expect(page).toContain(`Biggest rise by smoothed score: ${a!.sku}`);
    expect(page).toContain(`Biggest fall: ${b!.sku}`);
    expect(page).toContain('down 9 places');
    expect(page).toContain(
      `And ${changes.length - 4} more changes: the full list is in the Portable Power digest.`,
    );
    // the category digest itself lists every change
    const full = (await pdfPages((await renderCategoryDigest(d, 'A4')).pdf)).join(' ').replace(/\s+/g, ' ');
    for (const line of changes) expect(full).toContain(line.replace(/\s+/g, ' ').slice(0, 40));
  });
});

describe('produceDigests', () => {
  it('stores one digest per category and week plus the portfolio, and replaces rather than duplicates', async () => {
    const first = await produceDigests({ isoWeek: week, mail: false, now: testDemoAsOf });
    const second = await produceDigests({ isoWeek: week, mail: false, now: testDemoAsOf });
    expect(first.digests.filter((d) => d.kind === 'category')).toHaveLength(5);
    expect(first.digests.some((d) => d.kind === 'portfolio')).toBe(true);
    expect(second.digests.map((d) => d.id)).toEqual(first.digests.map((d) => d.id));
    expect(await Digest.count()).toBe(6);
    const stored = await Digest.findByPk(first.digests[0]!.id);
    expect(stored!.pdf.subarray(0, 5).toString()).toBe('%PDF-');
    expect(stored!.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(stored!.pageCount).toBeGreaterThan(4);
  });
});

describe('rank ranges in the digest (issue 19)', () => {
  it('marks each move as clear or within the noise from both weeks’ ranges, and draws the top 30 as bars', async () => {
    // The demo's largest category: where most moves happen.
    const largest = (await Category.findAll()).map((c) => c.id);
    const all = await Promise.all(largest.map((id) => loadCategoryDigestData(id, week, testDemoAsOf)));
    const data = all.sort((a, b) => b.figures.itemCount - a.figures.itemCount)[0]!;
    const clarity = moverClarity(data.items, data.previous);
    const movers = data.figures.movers.filter((m) => m.smoothedMovement !== 0);
    expect(movers.length).toBeGreaterThan(0);
    expect(movers.every((m) => clarity.has(m.sku))).toBe(true);
    // Recomputed here from the rule of shared/vocabulary.ts: clear only where the two ranges do not overlap.
    for (const m of movers) {
      const now = data.items.find((i) => i.sku === m.sku)!;
      const before = data.previous!.moverRanges![m.sku]!;
      const apart = before.high < now.rankLow! || now.rankHigh! < before.low;
      expect(clarity.get(m.sku)).toBe(apart ? 'clear' : 'noise');
    }
    const clear = movers.filter((m) => clarity.get(m.sku) === 'clear').length;
    console.log(
      `[rank ranges] ${data.category.name} ${week}: ${clear} of ${movers.length} smoothed moves are clear moves`,
    );
    const line = data.story.changes.find((l) => l.includes('smoothed move'))!;
    expect(line).toContain(rankWords.rule);
    expect(line).toContain(rankWords.withinNoise);
    const rise = data.story.changes.find((l) => l.startsWith('Biggest rise'));
    if (rise) expect(rise).toMatch(/ — (clear move|within the noise)\.$/);

    const { pdf } = await renderCategoryDigest(data, 'A4');
    const pages = await pdfPages(pdf);
    // The cover lists the section too: the page itself comes after it.
    const at = pages.findIndex((p, k) => k > 0 && p.includes(rankWords.pdfTitle));
    expect(at).toBeGreaterThan(0);
    const page = pages[at]!.replace(/\s+/g, ' ');
    const top = data.items.slice(0, Math.min(30, data.items.length));
    for (const item of top) expect(page).toContain(item.sku);
    expect(page).toContain(rankWords.range(top[0]!.rankLow!, top[0]!.rankHigh!));
    saveArtefacts(`rank-ranges-${data.category.slug}`, pdf, 1);
    execFileSync('pdftoppm', [
      '-png',
      '-r',
      '80',
      '-f',
      String(at + 1),
      '-l',
      String(at + 1),
      path.resolve('test-results', 'digests', `rank-ranges-${data.category.slug}.pdf`),
      path.resolve('test-results', 'digests', `rank-ranges-${data.category.slug}-page`),
    ]);
  });

  it('calls a move within the noise when the two weeks’ ranges overlap, and clear when they do not', () => {
    const item = (sku: string, low: number, high: number) =>
      ({ sku, rankLow: low, rankHigh: high }) as unknown as Parameters<typeof moverClarity>[0][number];
    const previous = {
      moverRanges: { a: { low: 3, high: 9 }, b: { low: 20, high: 30 } },
    } as unknown as Parameters<typeof moverClarity>[1];
    const c = moverClarity([item('a', 8, 15), item('b', 2, 12), item('c', 1, 2)], previous);
    expect(c.get('a')).toBe('noise');
    expect(c.get('b')).toBe('clear');
    expect(c.has('c')).toBe(false);
  });
});
