import type { CategoryDigestData, DigestItem } from '../../shared/schemas/digests.schema';
import { rankWords } from '../../shared/vocabulary';
import type { Canvas } from './canvas';
import { colours } from './theme';

/** The top `count` items that carry a rank range, by smoothed rank. */
export function rankedWithRanges(data: CategoryDigestData, count = 30): DigestItem[] {
  return data.items
    .filter((i) => i.rankLow != null && i.rankHigh != null && i.rankMedian != null)
    .sort((a, b) => a.smoothedRank - b.smoothedRank)
    .slice(0, count);
}

/**
 * Horizontal interval bars: one row per item, the bar from the 5th to the 95th percentile of its rank over
 * the posterior draws, a dot at the median rank and a tick at the point rank. Ranks grow to the right.
 */
export function rankIntervalBars(c: Canvas, items: DigestItem[]): void {
  if (items.length === 0) return;
  const doc = c.doc;
  const labelWidth = 150;
  const x0 = c.left + labelWidth + 36;
  const x1 = c.right - 8;
  const maxRank = Math.max(2, ...items.map((i) => i.rankHigh!));
  const px = (rank: number): number => x0 + ((rank - 1) / (maxRank - 1)) * (x1 - x0);
  const rowH = Math.min(16, (c.bottom - c.y - 40) / items.length);
  const top = c.y + 12;
  const step = maxRank <= 12 ? 1 : maxRank <= 40 ? 5 : maxRank <= 120 ? 10 : maxRank <= 400 ? 50 : 100;
  for (const r of [1, ...Array.from({ length: Math.floor(maxRank / step) }, (_, k) => (k + 1) * step)]) {
    if (r > maxRank) break;
    doc
      .save()
      .moveTo(px(r), top - 4)
      .lineTo(px(r), top + rowH * items.length)
      .lineWidth(0.3)
      .strokeColor(colours.ink100)
      .stroke()
      .restore();
    c.text(String(r), px(r) - 10, top - 14, {
      style: 'mono',
      size: 6.5,
      colour: colours.ink500,
      width: 20,
      align: 'center',
    });
  }
  items.forEach((item, k) => {
    const y = top + k * rowH + rowH / 2;
    if (k % 2 === 0) c.rect(c.left, y - rowH / 2, c.width, rowH, colours.paper);
    c.text(String(item.smoothedRank), c.left, y - 3.5, {
      style: 'monoBold',
      size: 7,
      width: 20,
      align: 'right',
    });
    c.text(c.fit(item.sku, labelWidth - 6, 'mono', 7), c.left + 26, y - 3.5, { style: 'mono', size: 7 });
    c.text(rankWords.range(item.rankLow!, item.rankHigh!), x0 - 40, y - 3.5, {
      style: 'mono',
      size: 6.5,
      colour: colours.ink500,
      width: 36,
      align: 'right',
    });
    const a = px(item.rankLow!);
    const b = px(item.rankHigh!);
    doc
      .save()
      .roundedRect(a - 1.5, y - 3, Math.max(3, b - a + 3), 6, 3)
      .fillColor(colours.brass300)
      .fill()
      .restore();
    doc
      .save()
      .moveTo(px(item.smoothedRank), y - 5)
      .lineTo(px(item.smoothedRank), y + 5)
      .lineWidth(1)
      .strokeColor(colours.ink700)
      .stroke()
      .restore();
    doc.save().circle(px(item.rankMedian!), y, 2.4).fillColor(colours.ink).fill().restore();
  });
  c.y = top + rowH * items.length + 10;
  c.text(
    `Bar: ${rankWords.chartBand(0.9)} · dot: median rank over the draws · tick: the week's smoothed rank`,
    x0,
    c.y,
    { style: 'semibold', size: 7, colour: colours.ink500, width: x1 - x0 },
  );
  c.y += 16;
}
