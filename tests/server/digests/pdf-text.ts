import { execFileSync } from 'node:child_process';
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { PDFParse } from 'pdf-parse';

/** The text of every page of a PDF, one string per page, as a reader's copy-paste would give it. */
export async function pdfPages(pdf: Buffer): Promise<string[]> {
  const parser = new PDFParse({ data: new Uint8Array(pdf) });
  try {
    const result = await parser.getText();
    return result.pages.map((p) => p.text);
  } finally {
    await parser.destroy();
  }
}

/** Writes the PDF and PNGs of its first pages under test-results/digests/ for people to look at. */
export function saveArtefacts(name: string, pdf: Buffer, firstPages = 3): string[] {
  const dir = path.resolve('test-results', 'digests');
  mkdirSync(dir, { recursive: true });
  const file = path.join(dir, `${name}.pdf`);
  writeFileSync(file, pdf);
  execFileSync('pdftoppm', [
    '-png',
    '-r',
    '80',
    '-f',
    '1',
    '-l',
    String(firstPages),
    file,
    path.join(dir, name),
  ]);
  return [file];
}
