import { Bar, Line } from 'react-chartjs-2';
import { countOf } from '../../../../shared/plural';
import type { ItemDetail } from '../../../../shared/schemas/standings.schema';
import { rankWords, standingsColumns } from '../../../../shared/vocabulary';
import { chartColours } from '../../../components/charts/chart-setup';

type Timeline = ItemDetail['timeline'];

/** Naive and smoothed rank per snapshotted week; rank 1 at the top. Weeks without the item leave a gap. */
export function RankTimeline({ timeline, sku }: { timeline: Timeline; sku: string }) {
  const present = timeline.filter((w) => w.smoothedRank !== null);
  const maxRank = Math.max(
    1,
    ...timeline.map((w) => Math.max(w.naiveRank ?? 0, w.smoothedRank ?? 0, w.rankHigh ?? 0)),
  );
  const hasBand = timeline.some((w) => w.rankLow !== null && w.rankHigh !== null);
  const level = timeline.find((w) => w.rankLevel !== null)?.rankLevel ?? 0.9;
  const band = rankWords.chartBand(level);
  const summary =
    present.length === 0
      ? `${sku} has no rank in any snapshotted week.`
      : `${sku} over ${timeline.length} weeks: smoothed rank from ${present[0]!.smoothedRank} in ${present[0]!.isoWeek} to ${present.at(-1)!.smoothedRank} in ${present.at(-1)!.isoWeek}; naive rank from ${present[0]!.naiveRank} to ${present.at(-1)!.naiveRank}.${
          present.at(-1)!.rankLow !== null && present.at(-1)!.rankHigh !== null
            ? ` Latest ${rankWords.chartBand(present.at(-1)!.rankLevel ?? 0.9)}: ${rankWords.range(present.at(-1)!.rankLow!, present.at(-1)!.rankHigh!)}.`
            : ''
        }`;
  return (
    <div className="h-72" role="img" aria-label={summary}>
      <Line
        data={{
          labels: timeline.map((w) => w.isoWeek),
          datasets: [
            // The band: the upper edge fills down to the lower edge (chart.js fill to the next dataset).
            ...(hasBand
              ? [
                  {
                    label: band,
                    data: timeline.map((w) => w.rankLow),
                    borderColor: 'transparent',
                    backgroundColor: `${chartColours.ink300}55`,
                    pointRadius: 0,
                    fill: '+1' as const,
                  },
                  {
                    label: `${band} (end)`,
                    data: timeline.map((w) => w.rankHigh),
                    borderColor: 'transparent',
                    backgroundColor: 'transparent',
                    pointRadius: 0,
                    fill: false as const,
                  },
                ]
              : []),
            {
              label: 'Smoothed rank',
              data: timeline.map((w) => w.smoothedRank),
              borderColor: chartColours.ink,
              backgroundColor: chartColours.ink,
              borderWidth: 2.5,
              pointRadius: 3,
              stepped: false,
            },
            {
              label: 'Naive rank (raw mean)',
              data: timeline.map((w) => w.naiveRank),
              borderColor: chartColours.brass,
              backgroundColor: chartColours.brass,
              borderDash: [6, 4],
              borderWidth: 2,
              pointRadius: 3,
            },
          ],
        }}
        options={{
          responsive: true,
          maintainAspectRatio: false,
          interaction: { mode: 'index', intersect: false },
          plugins: {
            legend: {
              position: 'bottom',
              labels: { boxWidth: 14, boxHeight: 2, filter: (item) => !item.text.endsWith('(end)') },
            },
            tooltip: {
              filter: (item) => !item.dataset.label?.startsWith(band),
              callbacks: {
                afterBody: (items) => {
                  const w = timeline[items[0]?.dataIndex ?? 0];
                  if (!w) return '';
                  const range =
                    w.rankLow !== null && w.rankHigh !== null
                      ? `; ${band} ${rankWords.range(w.rankLow, w.rankHigh)}`
                      : '';
                  return `of ${w.itemCount} items${range}`;
                },
              },
            },
          },
          scales: {
            y: {
              reverse: true,
              min: 1,
              suggestedMax: Math.min(maxRank + 2, Math.max(...timeline.map((w) => w.itemCount))),
              title: { display: true, text: 'Rank (1 = top)' },
              ticks: { precision: 0 },
            },
            x: { title: { display: true, text: 'ISO week' }, ticks: { autoSkip: true, maxRotation: 0 } },
          },
        }}
      />
    </div>
  );
}

/** Review count (bars) and the means over time (lines), on their own axes. */
export function EvidenceOverTime({ timeline }: { timeline: Timeline }) {
  return (
    <div
      className="h-72"
      role="img"
      aria-label={`Review count and means per week over ${timeline.length} weeks; the latest week has ${timeline.at(-1)?.n ?? 'no'} reviews.`}
    >
      <Bar
        data={{
          labels: timeline.map((w) => w.isoWeek),
          datasets: [
            {
              type: 'bar' as const,
              label: standingsColumns.n.label,
              data: timeline.map((w) => w.n),
              backgroundColor: `${chartColours.ink300}80`,
              yAxisID: 'count',
              order: 3,
            },
            {
              type: 'line' as const,
              label: standingsColumns.rawMean.label,
              data: timeline.map((w) => w.rawMean),
              borderColor: chartColours.brass,
              backgroundColor: chartColours.brass,
              borderDash: [6, 4],
              yAxisID: 'stars',
              pointRadius: 2,
              order: 1,
            },
            {
              type: 'line' as const,
              label: standingsColumns.smoothed.label,
              data: timeline.map((w) => w.smoothed),
              borderColor: chartColours.ink,
              backgroundColor: chartColours.ink,
              yAxisID: 'stars',
              pointRadius: 2,
              order: 0,
            },
            {
              type: 'line' as const,
              label: standingsColumns.lowerBound.label,
              data: timeline.map((w) => w.lowerBound),
              borderColor: chartColours.kelp,
              backgroundColor: chartColours.kelp,
              borderWidth: 1.5,
              yAxisID: 'stars',
              pointRadius: 0,
              order: 2,
            },
          ] as never,
        }}
        options={{
          responsive: true,
          maintainAspectRatio: false,
          interaction: { mode: 'index', intersect: false },
          plugins: { legend: { position: 'bottom', labels: { boxWidth: 12 } } },
          scales: {
            count: {
              type: 'linear',
              position: 'right',
              beginAtZero: true,
              title: { display: true, text: 'Reviews' },
              grid: { drawOnChartArea: false },
              ticks: { precision: 0 },
            },
            stars: {
              type: 'linear',
              position: 'left',
              min: 1,
              max: 5,
              title: { display: true, text: 'Stars' },
              ticks: { stepSize: 1 },
            },
            x: { ticks: { autoSkip: true, maxRotation: 0 } },
          },
        }}
      />
    </div>
  );
}

export function StarHistogram({ histogram }: { histogram: number[] }) {
  const total = histogram.reduce((s, c) => s + c, 0);
  return (
    <div className="h-48" role="img" aria-label={histogram.map((c, k) => `${k + 1} star: ${c}`).join(', ')}>
      <Bar
        data={{
          labels: ['5★', '4★', '3★', '2★', '1★'],
          datasets: [
            {
              label: standingsColumns.n.label,
              data: [...histogram].reverse(),
              backgroundColor: [
                chartColours.kelp,
                '#6fa58c',
                chartColours.ink300,
                '#d98b7c',
                chartColours.coral,
              ],
              borderRadius: 3,
            },
          ],
        }}
        options={{
          indexAxis: 'y',
          responsive: true,
          maintainAspectRatio: false,
          plugins: {
            legend: { display: false },
            tooltip: {
              callbacks: {
                label: (ctx) => {
                  const x = ctx.parsed.x ?? 0;
                  return `${countOf(x, 'review')} (${total ? Math.round((100 * x) / total) : 0}%)`;
                },
              },
            },
          },
          scales: {
            x: { beginAtZero: true, ticks: { precision: 0 }, title: { display: true, text: 'Reviews' } },
          },
        }}
      />
    </div>
  );
}
