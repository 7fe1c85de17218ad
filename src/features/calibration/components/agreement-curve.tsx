import { Line } from 'react-chartjs-2';
import type { CalibrationResult } from '../../../../shared/scoring';
import { chartColours } from '../../../components/charts/chart-setup';
import { terms } from '../../../../shared/vocabulary';
import { curveAxis } from './observed-summary';

/** Kendall's tau-b against the prior weight: a step function, drawn as steps on a log axis. */
export function AgreementCurve({ result }: { result: CalibrationResult }) {
  const steps = result.curve;
  const { lo, hi } = curveAxis(result);
  const points = steps.map((s) => ({ x: Math.max(s.start, lo), y: s.tau }));
  points.push({ x: hi, y: steps.at(-1)?.tau ?? null });
  const best = result.best;
  const bestEnd = best.end ?? hi;
  const strategies = result.strategies.filter((s) => s.m !== null && s.m > 0);
  return (
    <div
      className="h-80"
      role="img"
      aria-label={`Agreement curve with ${steps.length} steps; best ${terms.kendall} ${best.tau?.toFixed(3) ?? 'unknown'} for prior weights from ${best.start.toFixed(2)} to ${best.end === null ? 'infinity' : best.end.toFixed(2)}.`}
    >
      <Line
        data={{
          datasets: [
            {
              label: `${terms.kendall} with the observed ordering`,
              data: points,
              stepped: 'before',
              borderColor: chartColours.ink,
              backgroundColor: chartColours.ink,
              borderWidth: 2,
              pointRadius: 0,
            },
            {
              label: 'Best interval',
              data: [
                { x: Math.max(best.start, lo), y: best.tau },
                { x: bestEnd, y: best.tau },
              ],
              borderColor: chartColours.brass,
              backgroundColor: chartColours.brass,
              borderWidth: 6,
              pointRadius: 0,
            },
            {
              label: 'Named strategies',
              data: strategies.map((s) => ({ x: s.m!, y: s.tau, label: s.strategy })),
              showLine: false,
              pointRadius: 5,
              pointStyle: 'rectRot',
              borderColor: chartColours.coral,
              backgroundColor: chartColours.coral,
            },
          ],
        }}
        options={{
          responsive: true,
          maintainAspectRatio: false,
          parsing: false,
          plugins: {
            legend: { position: 'bottom', labels: { boxWidth: 12 } },
            tooltip: {
              callbacks: {
                label: (ctx) => {
                  const raw = ctx.raw as { x: number; y: number | null; label?: string };
                  return `${raw.label ? `${raw.label}: ` : ''}m = ${raw.x.toFixed(2)}, ${terms.kendallShort} = ${raw.y?.toFixed(3) ?? '—'}`;
                },
              },
            },
          },
          scales: {
            x: {
              type: 'logarithmic',
              min: lo,
              max: hi,
              title: { display: true, text: 'Prior weight m (log scale)' },
            },
            y: { title: { display: true, text: terms.kendall }, suggestedMax: 1 },
          },
        }}
      />
    </div>
  );
}
