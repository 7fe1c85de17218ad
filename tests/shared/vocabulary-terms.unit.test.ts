import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { terms } from '../../shared/vocabulary';

/*
 * Issue 14 point 10: one word per concept. The two rank-agreement measures are named by `terms` in
 * shared/vocabulary.ts; a screen, PDF or mail that spells its own variant ("Kendall τ-b", "Spearman ρ",
 * "Spearman rho") fails here.
 */
const root = path.resolve(__dirname, '../..');
const scanned = ['src', 'templates/pdf', 'templates/mail', 'server/modules'];
const variants = [/τ-b/, /Spearman ρ/, /\bKendall tau-b\b/, /\bKendall τ/, /\bSpearman rho\b/];
// A quoted short form as a whole string, e.g. a PDF header written as 'tau-b' instead of terms.kendallShort.
const shortLiteral = /['"`](tau-b|rho)['"`]/;

function files(dir: string): string[] {
  return readdirSync(path.join(root, dir), { withFileTypes: true }).flatMap((entry) => {
    const rel = path.join(dir, entry.name);
    if (entry.isDirectory()) return files(rel);
    return /\.(ts|tsx|hbs|html|mjml)$/.test(entry.name) ? [rel] : [];
  });
}

describe('names of the rank-agreement measures', () => {
  it('are the vocabulary words and their short forms', () => {
    expect(terms.kendall).toBe("Kendall's tau-b");
    expect(terms.spearman).toBe("Spearman's rho");
    expect(terms.kendallShort).toBe('tau-b');
    expect(terms.spearmanShort).toBe('rho');
  });

  it('are never spelled another way on a screen, in a PDF, a mail or an API message', () => {
    const found: string[] = [];
    for (const file of scanned.flatMap(files)) {
      const lines = readFileSync(path.join(root, file), 'utf8').split('\n');
      lines.forEach((line, i) => {
        if (/^\s*(\/\/|\*|\/\*)/.test(line)) return; // comments speak to developers
        if (variants.some((v) => v.test(line)) || shortLiteral.test(line)) found.push(`${file}:${i + 1}`);
      });
    }
    expect(found).toEqual([]);
  });
});
