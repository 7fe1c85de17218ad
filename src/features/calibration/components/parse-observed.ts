/**
 * Reads an observed ordering, best first: one sku per line, or a CSV whose column named "sku" (or else its
 * first column) holds them. Blank lines and a header row are skipped.
 */
export function parseObserved(text: string): string[] {
  const lines = text
    .split(/\r?\n/)
    .map((l) => l.trim())
    .filter(Boolean);
  if (lines.length === 0) return [];
  const cells = (line: string) => line.split(/[,;\t]/).map((c) => c.trim().replace(/^"|"$/g, ''));
  const header = cells(lines[0]!).map((c) => c.toLowerCase());
  const skuColumn = header.indexOf('sku');
  const start = skuColumn >= 0 || ['position', 'rank', 'item'].includes(header[0] ?? '') ? 1 : 0;
  const column = Math.max(0, skuColumn);
  return lines
    .slice(start)
    .map((line) => cells(line)[column] ?? '')
    .filter(Boolean);
}
