import { Bar } from 'react-chartjs-2';
import { Link } from 'react-router-dom';
import { countOf } from '../../../../shared/plural';
import { chartColours } from '../../../components/charts/chart-setup';
import { EmptyState, ErrorPanel, Loading } from '../../../components/ui/status';
import { fmt } from '../../../lib/format';
import { useFreshness } from '../api/get-freshness';

/** How recent each item's evidence is, and which items have gone quiet. */
export function FreshnessPanel({ slug, week }: { slug: string; week: string | undefined }) {
  const freshness = useFreshness(slug, week);
  if (freshness.isPending) return <Loading label="Loading review ages…" />;
  if (freshness.isError)
    return <ErrorPanel error={freshness.error} onRetry={() => void freshness.refetch()} />;
  const f = freshness.data;
  const staleFrom = f.staleAfterDays;
  return (
    <div className="grid gap-6 lg:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
      <section aria-labelledby="age-heading" className="rounded-lg border border-ink-100 bg-white p-4">
        <h3 id="age-heading" className="font-bold text-ink-900">
          Age of each item&apos;s newest review
        </h3>
        <p className="text-sm text-ink-500">
          Items count as stale after {staleFrom} days without a review.
          {f.unknownAge > 0 ? ` ${countOf(f.unknownAge, 'item has', 'items have')} no review dates.` : ''}
        </p>
        <div
          className="mt-3 h-64"
          role="img"
          aria-label={f.buckets.map((b) => `${b.label}: ${countOf(b.count, 'item')}`).join('; ')}
        >
          <Bar
            data={{
              labels: f.buckets.map((b) => b.label),
              datasets: [
                {
                  label: 'Items',
                  data: f.buckets.map((b) => b.count),
                  backgroundColor: f.buckets.map((b) =>
                    b.from >= staleFrom ? chartColours.coral : chartColours.ink500,
                  ),
                  borderRadius: 4,
                },
              ],
            }}
            options={{
              responsive: true,
              maintainAspectRatio: false,
              plugins: { legend: { display: false } },
              scales: {
                y: { beginAtZero: true, title: { display: true, text: 'Items' }, ticks: { precision: 0 } },
                x: { title: { display: true, text: 'Newest review is…' } },
              },
            }}
          />
        </div>
      </section>
      <section aria-labelledby="stale-heading" className="rounded-lg border border-ink-100 bg-white p-4">
        <h3 id="stale-heading" className="font-bold text-ink-900">
          Stale items <span className="font-mono text-sm text-ink-500">({f.staleTotal})</span>
        </h3>
        {f.stale.length === 0 ? (
          <EmptyState title="No stale items this week" />
        ) : (
          <table className="mt-2 w-full text-sm">
            <caption className="sr-only">Stale items, oldest newest-review first</caption>
            <thead className="text-left text-xs uppercase tracking-wide text-ink-500">
              <tr>
                <th scope="col" className="py-1">
                  Item
                </th>
                <th scope="col" className="py-1 text-right">
                  Newest review
                </th>
                <th scope="col" className="py-1 text-right">
                  Smoothed #
                </th>
              </tr>
            </thead>
            <tbody>
              {f.stale.map((s) => (
                <tr key={s.sku} className="border-t border-ink-50">
                  <td className="py-1.5">
                    <Link
                      to={`/categories/${slug}/items/${encodeURIComponent(s.sku)}`}
                      className="font-semibold hover:underline"
                    >
                      {s.title}
                    </Link>
                    <span className="block font-mono text-xs text-ink-500">{s.sku}</span>
                  </td>
                  <td className="py-1.5 text-right">
                    {fmt.date(s.newestAt)}
                    <span className="block text-xs text-ink-500">{fmt.age(s.newestAgeDays)} ago</span>
                  </td>
                  <td className="py-1.5 text-right font-mono">{s.smoothedRank}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
    </div>
  );
}
