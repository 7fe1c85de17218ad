import type { DigestItem } from '../../shared/schemas/digests.schema';
import type { Canvas, FontStyle } from './canvas';
import { colours } from './theme';

export const dash = '—';

const formats = new Map<number, Intl.NumberFormat>();
function formatter(digits: number): Intl.NumberFormat {
  let f = formats.get(digits);
  if (!f) {
    f = new Intl.NumberFormat('en-GB', { minimumFractionDigits: digits, maximumFractionDigits: digits });
    formats.set(digits, f);
  }
  return f;
}

export function num(value: number | null | undefined, digits = 2): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return dash;
  return formatter(digits).format(value);
}

export function int(value: number | null | undefined): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return dash;
  return formatter(0).format(Math.round(value));
}

export function pct(value: number | null | undefined, digits = 0): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return dash;
  return `${(value * 100).toFixed(digits)}%`;
}

/** +3, −2 or 0 (a true minus sign, so columns of signed numbers line up). */
export function signed(value: number | null | undefined): string {
  if (value === null || value === undefined) return dash;
  if (value > 0) return `+${value}`;
  if (value < 0) return `\u2212${Math.abs(value)}`;
  return '0';
}

export function pValue(p: number | null | undefined): string {
  if (p === null || p === undefined) return dash;
  if (p < 0.0001) return '< 0.0001';
  return p.toFixed(4);
}

export function longDate(iso: string): string {
  const d = new Date(`${iso.slice(0, 10)}T00:00:00Z`);
  return d.toLocaleDateString('en-GB', { day: 'numeric', month: 'long', year: 'numeric', timeZone: 'UTC' });
}

export function flags(item: DigestItem): string {
  return [item.thin ? 'thin' : '', item.stale ? 'stale' : '', item.negativeCluster ? 'cluster' : '']
    .filter(Boolean)
    .join(' · ');
}

/** A section title with a brass tick; starts a new page when less than `keep` points remain. */
export function heading(c: Canvas, title: string, lead?: string, keep = 120): void {
  c.ensure(keep);
  if (c.y > c.top + 4) c.y += 10;
  c.rect(c.left, c.y + 2, 4, 15, colours.brass);
  c.text(title, c.left + 12, c.y, { style: 'heavy', size: 14, width: c.width - 12 });
  c.y += 24;
  if (lead) {
    c.paragraph(lead, { size: 9, colour: colours.ink500 });
    c.y += 4;
  }
}

export type Tile = { label: string; value: string; note?: string; noteColour?: string };

/** A grid of key-figure tiles at the cursor. */
export function tiles(c: Canvas, items: Tile[], columns = 4, x = c.left, width = c.width): void {
  const gap = 8;
  const w = (width - gap * (columns - 1)) / columns;
  const h = 56;
  items.forEach((tile, i) => {
    const col = i % columns;
    const row = Math.floor(i / columns);
    const tx = x + col * (w + gap);
    const ty = c.y + row * (h + gap);
    c.rect(tx, ty, w, h, colours.paper);
    c.rect(tx, ty, w, 2, colours.brass300);
    c.text(tile.label.toUpperCase(), tx + 9, ty + 9, {
      style: 'bold',
      size: 6.5,
      colour: colours.ink500,
      width: w - 18,
    });
    c.text(tile.value, tx + 9, ty + 20, { style: 'heavy', size: 17, width: w - 18 });
    if (tile.note) {
      c.text(tile.note, tx + 9, ty + 42, {
        style: 'medium',
        size: 6.8,
        colour: tile.noteColour ?? colours.ink500,
        width: w - 18,
      });
    }
  });
  c.y += Math.ceil(items.length / columns) * (h + gap) + 4;
}

export type Column<T> = {
  header: string;
  /** Share of the table width. */
  share: number;
  align?: 'left' | 'right';
  style?: FontStyle;
  value: (row: T) => string;
  colour?: (row: T) => string | undefined;
};

/** A table that breaks across pages, repeating its header row on each page it reaches. */
export function table<T>(
  c: Canvas,
  columns: Column<T>[],
  rows: T[],
  options: { size?: number; rowHeight?: number; x?: number; width?: number; continued?: string } = {},
): void {
  const size = options.size ?? 8;
  const rowHeight = options.rowHeight ?? size * 1.9;
  const x0 = options.x ?? c.left;
  const width = options.width ?? c.width;
  const total = columns.reduce((s, col) => s + col.share, 0);
  const widths = columns.map((col) => (col.share / total) * width);
  const pad = 4;

  const header = (again: boolean): void => {
    if (again && options.continued) {
      c.text(`${options.continued} (continued)`, x0, c.y, {
        style: 'semibold',
        size: 8,
        colour: colours.ink500,
      });
      c.y += 14;
    }
    let x = x0;
    c.rect(x0, c.y, width, rowHeight + 2, colours.ink);
    columns.forEach((col, i) => {
      c.text(col.header, x + pad, c.y + (rowHeight + 2 - size) / 2 - 0.5, {
        style: 'bold',
        size: size - 0.5,
        colour: colours.white,
        width: widths[i]! - pad * 2,
        align: col.align ?? 'left',
      });
      x += widths[i]!;
    });
    c.y += rowHeight + 2;
  };

  c.ensure(rowHeight * 3 + 4);
  header(false);
  rows.forEach((row, r) => {
    if (c.y + rowHeight > c.bottom) {
      c.newPage();
      header(true);
    }
    if (r % 2 === 1) c.rect(x0, c.y, width, rowHeight, colours.ink50);
    let x = x0;
    columns.forEach((col, i) => {
      c.text(col.value(row), x + pad, c.y + (rowHeight - size) / 2 - 0.5, {
        style: col.style ?? 'regular',
        size,
        colour: col.colour?.(row) ?? colours.ink,
        width: widths[i]! - pad * 2,
        align: col.align ?? 'left',
      });
      x += widths[i]!;
    });
    c.y += rowHeight;
  });
  c.rule(c.y, colours.ink200);
  c.y += 8;
}

export function note(c: Canvas, value: string): void {
  c.paragraph(value, { size: 8.5, colour: colours.ink500 });
  c.y += 2;
}

/** Bullet sentences with a brass dot. */
export function bullets(
  c: Canvas,
  lines: string[],
  options: { size?: number; width?: number; x?: number } = {},
): void {
  const size = options.size ?? 9.5;
  const x = options.x ?? c.left;
  const width = options.width ?? c.width;
  for (const line of lines) {
    const wrapped = c.wrap(line, width - 14, 'regular', size);
    c.ensure(wrapped.length * size * 1.45 + 4);
    c.doc
      .save()
      .circle(x + 3, c.y + size * 0.62, 2)
      .fillColor(colours.brass)
      .fill()
      .restore();
    for (const l of wrapped) {
      c.text(l, x + 14, c.y, { size });
      c.y += size * 1.45;
    }
    c.y += 3;
  }
}

function niceStep(n: number): number {
  const raw = n / 5;
  const mag = 10 ** Math.floor(Math.log10(Math.max(1, raw)));
  for (const m of [1, 2, 2.5, 5, 10]) if (m * mag >= raw) return m * mag;
  return 10 * mag;
}

/**
 * Each item as a point at (naive rank, smoothed rank), drawn as vectors. Points on the diagonal rank the
 * same in both orderings; above it the smoothed ordering lifts the item, below it the item drops.
 */
export function driftChart(
  c: Canvas,
  items: DigestItem[],
  options: { x?: number; y?: number; size: number; labels?: number },
): void {
  const x0 = (options.x ?? c.left) + 30;
  const y0 = options.y ?? c.y;
  const s = options.size - 30;
  const n = Math.max(2, ...items.map((i) => Math.max(i.naiveRank, i.smoothedRank)));
  const px = (rank: number): number => x0 + ((rank - 1) / (n - 1)) * s;
  const py = (rank: number): number => y0 + ((rank - 1) / (n - 1)) * s;
  const doc = c.doc;

  c.rect(x0, y0, s, s, colours.paper);
  const top = Math.min(10, n);
  c.rect(x0, y0, px(top) - x0 + 2, s, colours.brass100);
  c.rect(x0, y0, s, py(top) - y0 + 2, colours.brass100);
  doc.save().rect(x0, y0, s, s).lineWidth(0.6).strokeColor(colours.ink200).stroke().restore();

  const step = niceStep(n);
  for (let r = step; r <= n; r += step) {
    doc
      .save()
      .moveTo(px(r), y0)
      .lineTo(px(r), y0 + s)
      .lineWidth(0.3)
      .strokeColor(colours.ink100)
      .stroke()
      .restore();
    doc
      .save()
      .moveTo(x0, py(r))
      .lineTo(x0 + s, py(r))
      .lineWidth(0.3)
      .strokeColor(colours.ink100)
      .stroke()
      .restore();
  }
  for (const r of [1, ...Array.from({ length: Math.floor(n / step) }, (_, i) => (i + 1) * step)]) {
    c.text(String(r), px(r) - 10, y0 + s + 4, {
      style: 'mono',
      size: 6.5,
      colour: colours.ink500,
      width: 20,
      align: 'center',
    });
    c.text(String(r), x0 - 24, py(r) - 3.5, {
      style: 'mono',
      size: 6.5,
      colour: colours.ink500,
      width: 20,
      align: 'right',
    });
  }
  doc
    .save()
    .moveTo(px(1), py(1))
    .lineTo(px(n), py(n))
    .lineWidth(0.8)
    .dash(3, { space: 2 })
    .strokeColor(colours.ink300)
    .stroke()
    .undash()
    .restore();

  const radius = n > 300 ? 1.3 : n > 120 ? 1.8 : 2.4;
  const ordered = [...items].sort((a, b) => Math.abs(a.drift) - Math.abs(b.drift));
  for (const item of ordered) {
    const colour = item.drift > 0 ? colours.kelp : item.drift < 0 ? colours.coral : colours.ink500;
    doc
      .save()
      .circle(px(item.naiveRank), py(item.smoothedRank), radius)
      .fillOpacity(0.85)
      .fillColor(colour)
      .fill()
      .restore();
  }
  const labelled = [...items].sort(
    (a, b) => Math.abs(b.drift) - Math.abs(a.drift) || a.smoothedRank - b.smoothedRank,
  );
  const placed: [number, number, number, number][] = [];
  const clash = (x: number, y: number, w: number): boolean =>
    placed.some(([px0, py0, pw, ph]) => x < px0 + pw && x + w > px0 && y < py0 + ph && y + 9 > py0);
  for (const item of labelled.slice(0, options.labels ?? 6)) {
    if (item.drift === 0) continue;
    const lx = px(item.naiveRank);
    let ly = py(item.smoothedRank);
    const label = c.fit(item.sku, 70, 'monoBold', 6.5);
    const w = c.measure(label, 'monoBold', 6.5);
    const right = lx + 5 + w < x0 + s;
    const tx = right ? lx + 5 : lx - 5 - w;
    for (let tries = 0; tries < 6 && clash(tx - 1.5, ly - 4.5, w + 3); tries += 1) ly += 9;
    placed.push([tx - 1.5, ly - 4.5, w + 3, 9]);
    doc
      .save()
      .rect(tx - 1.5, ly - 4.5, w + 3, 9)
      .fillOpacity(0.85)
      .fillColor(colours.white)
      .fill()
      .restore();
    c.text(label, tx, ly - 3.5, { style: 'monoBold', size: 6.5, colour: colours.ink });
  }
  c.text('Rank by raw mean (naive)', x0, y0 + s + 14, {
    style: 'semibold',
    size: 7.5,
    colour: colours.ink500,
    width: s,
    align: 'center',
  });
  doc.save();
  doc.rotate(-90, { origin: [x0 - 30, y0 + s / 2] });
  c.text('Rank by smoothed score', x0 - 30 - s / 2, y0 + s / 2 - 4, {
    style: 'semibold',
    size: 7.5,
    colour: colours.ink500,
    width: s,
    align: 'center',
  });
  doc.restore();
}

export function legend(c: Canvas, x: number, y: number): number {
  const entries: [string, string][] = [
    [colours.kelp, 'Lifted by smoothing'],
    [colours.coral, 'Dropped by smoothing'],
    [colours.ink500, 'Same rank either way'],
  ];
  let cy = y;
  for (const [colour, label] of entries) {
    c.doc
      .save()
      .circle(x + 3, cy + 4, 2.6)
      .fillColor(colour)
      .fill()
      .restore();
    c.text(label, x + 11, cy, { size: 8, colour: colours.ink700 });
    cy += 13;
  }
  c.rect(x, cy + 1, 7, 7, colours.brass100);
  c.text('Top ten of either', x + 11, cy, { size: 8, colour: colours.ink700 });
  cy += 13;
  c.doc
    .save()
    .moveTo(x, cy + 4)
    .lineTo(x + 7, cy + 4)
    .dash(2, { space: 1.5 })
    .strokeColor(colours.ink300)
    .stroke()
    .undash()
    .restore();
  c.text('Both orderings agree', x + 11, cy, { size: 8, colour: colours.ink700 });
  return cy + 13 - y;
}
