import { useNavigate } from 'react-router-dom';
import { DriftScatter } from '../../../components/charts/drift-scatter';
import { ErrorPanel, Loading } from '../../../components/ui/status';
import { useDrift } from '../api/get-drift';

export function DriftPanel({ slug, week }: { slug: string; week: string | undefined }) {
  const drift = useDrift(slug, week);
  const navigate = useNavigate();
  if (drift.isPending) return <Loading label="Loading the drift chart…" />;
  if (drift.isError) return <ErrorPanel error={drift.error} onRetry={() => void drift.refetch()} />;
  const d = drift.data;
  const points = d.skus.map((sku, i) => ({
    sku,
    title: d.titles[i],
    n: d.n[i],
    naive: d.naive[i]!,
    smoothed: d.smoothed[i]!,
  }));
  const lifted = points.filter((p) => p.naive > p.smoothed).length;
  const lowered = points.filter((p) => p.naive < p.smoothed).length;
  return (
    <section aria-labelledby="drift-heading" className="rounded-lg border border-ink-100 bg-white p-4">
      <h3 id="drift-heading" className="font-bold text-ink-900">
        Naive against smoothed rank, {d.isoWeek}
      </h3>
      <p className="text-sm text-ink-500">
        Each dot is an item. On the dashed line both orderings agree; {lifted} items sit above it (smoothing
        lifts them) and {lowered} below it (their raw mean rests on less evidence than it suggests).
      </p>
      <DriftScatter
        points={points}
        onOpen={(sku) =>
          void navigate(`/categories/${slug}/items/${encodeURIComponent(sku)}${week ? `?week=${week}` : ''}`)
        }
        title={`Scatter of ${points.length} items: naive rank against smoothed rank; ${lifted} lifted, ${lowered} pulled down.`}
      />
    </section>
  );
}
