import { readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { buildColumns } from '../../src/features/standings/components/standings-table';
import { priorWeightApplied, standingsColumns, standingsLabels } from '../../shared/vocabulary';

const root = path.resolve(__dirname, '../..');
// Where standings columns are labelled: the screens, the PDF tables and the CSV export.
const labelledFiles = [
  'src/features/standings/components/standings-table.tsx',
  'src/app/routes/portfolio/item.tsx',
  'src/features/item/components/item-charts.tsx',
  'templates/pdf/category-digest.ts',
  'server/modules/standings/standings.service.ts',
];
// Words that once named standings columns beside the vocabulary's own.
const synonyms = ['Score', 'Lower', 'Raw', 'Raw #', '#', 'Rank', 'Spearman rho', 'Kendall tau-b'];

describe('shared/vocabulary', () => {
  it('labels every column of the standings table', () => {
    const headers = buildColumns('demo', undefined).map((c) => c.header);
    for (const header of headers) expect(standingsLabels.has(String(header)), String(header)).toBe(true);
  });

  it('is the only place a standings column is named in a header', () => {
    const all = [...standingsLabels, ...Object.values(standingsColumns).map((c) => c.csv), ...synonyms];
    for (const file of labelledFiles) {
      const text = readFileSync(path.join(root, file), 'utf8');
      const literals = [...text.matchAll(/(?:header|label):\s*['"`]([^'"`]+)['"`]/g)].map((m) => m[1]!);
      expect(
        literals.filter((l) => all.includes(l)),
        file,
      ).toEqual([]);
    }
  });

  it('says when m comes from a fallback strategy', () => {
    expect(priorWeightApplied({ priorWeightStrategy: 'mean', priorWeightApplied: 'mean' })).toBe(
      'mean review count',
    );
    expect(priorWeightApplied({ priorWeightStrategy: 'credibility', priorWeightApplied: 'total' })).toBe(
      'total review count, a fallback: credibility could not be estimated',
    );
  });
});
