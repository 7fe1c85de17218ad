import { Scatter } from 'react-chartjs-2';
import { countOf } from '../../../shared/plural';
import { standingsColumns } from '../../../shared/vocabulary';
import { chartColours } from './chart-setup';

export type DriftPoint = {
  sku: string;
  naive: number;
  smoothed: number;
  highlight?: boolean;
  title?: string;
  n?: number;
};

/**
 * Naive rank across, smoothed rank up: items on the diagonal rank the same both ways; above it (towards 1)
 * smoothing lifts them, below it smoothing pulls them down. Rank 1 sits at the top and at the left.
 */
export function DriftScatter({
  points,
  title,
  onOpen,
}: {
  points: DriftPoint[];
  title: string;
  /** Opens the item behind a dot; without it the dots only explain themselves. */
  onOpen?: (sku: string) => void;
}) {
  const max = Math.max(1, ...points.map((p) => Math.max(p.naive, p.smoothed)));
  const lifted = points.filter((p) => p.naive > p.smoothed && !p.highlight);
  const lowered = points.filter((p) => p.naive < p.smoothed && !p.highlight);
  const level = points.filter((p) => p.naive === p.smoothed && !p.highlight);
  const marked = points.filter((p) => p.highlight);
  const toXY = (list: DriftPoint[]) =>
    list.map((p) => ({ x: p.naive, y: p.smoothed, sku: p.sku, title: p.title, n: p.n }));
  const ticks = { precision: 0 };
  return (
    <div className="h-[26rem]" role="img" aria-label={title}>
      <Scatter
        data={{
          datasets: [
            {
              label: 'Same rank both ways',
              data: [
                { x: 1, y: 1, sku: '', title: undefined, n: undefined },
                { x: max, y: max, sku: '', title: undefined, n: undefined },
              ],
              showLine: true,
              borderColor: chartColours.ink300,
              borderDash: [5, 4],
              borderWidth: 1,
              pointRadius: 0,
            },
            {
              label: 'Lifted by smoothing',
              data: toXY(lifted),
              backgroundColor: `${chartColours.kelp}b0`,
              pointRadius: 3,
            },
            {
              label: 'Pulled down by smoothing',
              data: toXY(lowered),
              backgroundColor: `${chartColours.coral}b0`,
              pointRadius: 3,
            },
            {
              label: 'Same rank',
              data: toXY(level),
              backgroundColor: `${chartColours.ink500}90`,
              pointRadius: 3,
            },
            ...(marked.length > 0
              ? [
                  {
                    label: 'Moves most in the preview',
                    data: toXY(marked),
                    backgroundColor: chartColours.brass,
                    borderColor: chartColours.ink,
                    borderWidth: 1,
                    pointRadius: 5,
                  },
                ]
              : []),
          ],
        }}
        options={{
          responsive: true,
          maintainAspectRatio: false,
          onClick: (_event, elements, chart) => {
            const hit = elements[0];
            if (!onOpen || !hit) return;
            const raw = chart.data.datasets[hit.datasetIndex]?.data[hit.index] as
              { sku?: string } | undefined;
            if (raw?.sku) onOpen(raw.sku);
          },
          onHover: (event, elements) => {
            const target = event.native?.target as HTMLElement | undefined;
            if (target && onOpen) target.style.cursor = elements.length > 0 ? 'pointer' : 'default';
          },
          plugins: {
            legend: { position: 'bottom', labels: { boxWidth: 10, boxHeight: 10 } },
            tooltip: {
              callbacks: {
                label: (ctx) => {
                  const raw = ctx.raw as { x: number; y: number; sku?: string; title?: string; n?: number };
                  if (!raw.sku) return '';
                  const lines = [
                    raw.title ? `${raw.title} (${raw.sku})` : raw.sku,
                    `${standingsColumns.naiveRank.label}${raw.x}, ${standingsColumns.smoothedRank.label}${raw.y}`,
                  ];
                  if (raw.n !== undefined) lines.push(countOf(raw.n, 'review'));
                  if (onOpen) lines.push('Click to open the item');
                  return lines;
                },
              },
            },
          },
          scales: {
            x: { min: 1, max, title: { display: true, text: 'Naive rank (raw mean)' }, ticks },
            y: { min: 1, max, reverse: true, title: { display: true, text: 'Smoothed rank' }, ticks },
          },
        }}
      />
    </div>
  );
}
