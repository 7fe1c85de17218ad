import { Link } from 'react-router-dom';
import { countOf } from '../../../../shared/plural';
import type { PortfolioEntry } from '../../../../shared/schemas/standings.schema';
import { chartColours } from '../../../components/charts/chart-setup';
import { Sparkline } from '../../../components/charts/sparkline';
import { fmt } from '../../../lib/format';
import { terms } from '../../../../shared/vocabulary';

function Figure({
  label,
  value,
  hint,
  trend,
  colour,
  extra,
}: {
  label: string;
  value: string;
  extra?: string;
  hint: string;
  trend: (number | null)[];
  colour: string;
}) {
  return (
    <div className="flex items-end justify-between gap-2 border-t border-ink-50 py-2">
      <div>
        <dt className="text-xs font-semibold text-ink-500" title={hint}>
          {label}
        </dt>
        <dd className="font-mono text-lg font-semibold text-ink-900">
          {value}
          {extra ? <span className="ml-2 text-xs font-normal text-ink-500">{extra}</span> : null}
        </dd>
      </div>
      <Sparkline values={trend} colour={colour} label={`${label} over the last ${trend.length} weeks`} />
    </div>
  );
}

/** One category's latest week (or the week asked for) at a glance, with where each figure has been heading. */
export function PortfolioCard({ entry, asOfWeek }: { entry: PortfolioEntry; asOfWeek?: string }) {
  const latest = entry.latest;
  const trend = entry.trend;
  return (
    <article className="flex h-full flex-col rounded-xl border border-ink-100 bg-white shadow-sm transition hover:border-brass-500 hover:shadow-md">
      <header className="px-5 pt-4">
        <h2 className="text-lg font-bold text-ink-900">
          <Link
            to={`/categories/${entry.slug}${asOfWeek && latest ? `?week=${latest.isoWeek}` : ''}`}
            className="after:absolute after:inset-0 focus-visible:outline-none"
            aria-describedby={`week-${entry.slug}`}
          >
            {entry.name}
          </Link>
        </h2>
        <p id={`week-${entry.slug}`} className="text-xs text-ink-500">
          {latest
            ? `${latest.isoWeek} · ${countOf(latest.itemCount, 'item')} · ${countOf(latest.reviewCount, 'review')}`
            : 'No weekly snapshot yet'}
        </p>
      </header>
      {latest ? (
        <dl className="mt-2 px-5 pb-4">
          <Figure
            label={`Rank agreement, ${terms.kendall}`}
            value={fmt.num(latest.kendallTauB, 3)}
            extra={`${terms.spearman} ${fmt.num(latest.spearmanRho, 3)}`}
            hint="How far the naive and smoothed orderings agree: 1 is the same order."
            trend={trend.map((w) => w.kendallTauB)}
            colour={chartColours.ink}
          />
          <Figure
            label="Mean |drift|"
            value={`${fmt.num(latest.meanAbsDrift, 1)} places`}
            hint="Average places an item moves between the naive and the smoothed ordering."
            trend={trend.map((w) => w.meanAbsDrift)}
            colour={chartColours.brass700}
          />
          <Figure
            label="Stale"
            value={fmt.pct(latest.staleShare)}
            hint="Share of items whose newest review is older than the staleness threshold."
            trend={trend.map((w) => w.staleShare)}
            colour={chartColours.ink500}
          />
          <Figure
            label="On thin evidence"
            value={fmt.pct(latest.thinShare)}
            hint="Share of items with fewer reviews than the thin-evidence threshold."
            trend={trend.map((w) => w.thinShare)}
            colour={chartColours.brass}
          />
          <Figure
            label="Negative clusters"
            value={String(latest.clusterCount)}
            hint="Items with an improbable run of recent one-star reviews."
            trend={trend.map((w) => w.clusterCount)}
            colour={chartColours.coral}
          />
        </dl>
      ) : (
        <p className="px-5 pb-5 pt-3 text-sm text-ink-500">
          Figures appear after the first weekly snapshot of this category.
        </p>
      )}
    </article>
  );
}
