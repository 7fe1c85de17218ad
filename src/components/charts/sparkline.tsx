import { Line } from 'react-chartjs-2';
import { chartColours } from './chart-setup';

/** A small trend line without axes; the figures beside it carry the numbers for screen readers. */
export function Sparkline({
  values,
  label,
  colour = chartColours.ink500,
  invert = false,
}: {
  values: (number | null)[];
  label: string;
  colour?: string;
  invert?: boolean;
}) {
  return (
    <div className="h-9 w-28" role="img" aria-label={label}>
      <Line
        data={{
          labels: values.map((_, i) => i),
          datasets: [
            {
              data: values,
              borderColor: colour,
              backgroundColor: `${colour}22`,
              borderWidth: 1.75,
              pointRadius: values.map((_, i) => (i === values.length - 1 ? 2.5 : 0)),
              pointBackgroundColor: colour,
              fill: true,
              tension: 0.3,
              spanGaps: true,
            },
          ],
        }}
        options={{
          responsive: true,
          maintainAspectRatio: false,
          plugins: { legend: { display: false }, tooltip: { enabled: false } },
          scales: { x: { display: false }, y: { display: false, reverse: invert } },
          events: [],
        }}
      />
    </div>
  );
}
