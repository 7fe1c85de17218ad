import { Scatter } from 'react-chartjs-2';
import { chartColours } from './chart-setup';

export type DriftPoint = { sku: string; naive: number; smoothed: number; highlight?: boolean };

/**
 * Naive rank across, smoothed rank up: items on the diagonal rank the same both ways; above it (towards 1)
 * smoothing lifts them, below it smoothing pulls them down. Rank 1 sits at the top and at the left.
 */
export function DriftScatter({ points, title }: { points: DriftPoint[]; title: string }) {
  const max = Math.max(1, ...points.map((p) => Math.max(p.naive, p.smoothed)));
  const lifted = points.filter((p) => p.naive > p.smoothed && !p.highlight);
  const lowered = points.filter((p) => p.naive < p.smoothed && !p.highlight);
  const level = points.filter((p) => p.naive === p.smoothed && !p.highlight);
  const marked = points.filter((p) => p.highlight);
  const toXY = (list: DriftPoint[]) => list.map((p) => ({ x: p.naive, y: p.smoothed, sku: p.sku }));
  const ticks = { precision: 0 };
  return (
    <div className="h-[26rem]" role="img" aria-label={title}>
      <Scatter
        data={{
          datasets: [
            {
              label: 'Same rank both ways',
              data: [
                { x: 1, y: 1, sku: '' },
                { x: max, y: max, sku: '' },
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
          plugins: {
            legend: { position: 'bottom', labels: { boxWidth: 10, boxHeight: 10 } },
            tooltip: {
              callbacks: {
                label: (ctx) => {
                  const raw = ctx.raw as { x: number; y: number; sku?: string };
                  return raw.sku ? `${raw.sku}: naive #${raw.x}, smoothed #${raw.y}` : '';
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
