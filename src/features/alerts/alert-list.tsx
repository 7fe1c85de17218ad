import { format } from 'date-fns';
import { Link } from 'react-router-dom';
import type { AlertRecord } from '../../../shared/schemas/alerts.schema';

const sourceLabel: Record<AlertRecord['source'], string> = {
  import: 'after an import',
  snapshot: 'after a snapshot',
  daily: 'daily check',
};

const mailLabel: Record<string, string> = {
  mailed: 'mailed',
  waiting: 'waiting (quiet hours or next batch)',
  held: 'over the daily limit: not mailed',
};

/** Alerts newest first, each with the item link and the evidence that raised it. */
export function AlertList({ items, showCategory }: { items: AlertRecord[]; showCategory: boolean }) {
  return (
    <ul className="divide-y divide-ink-100 rounded-lg border border-ink-100 bg-white">
      {items.map((a) => (
        <li key={a.id} className="px-4 py-3 text-sm" data-testid="alert">
          <div className="flex flex-wrap items-baseline gap-x-3 gap-y-1">
            <span className="rounded bg-brass-100 px-2 py-0.5 text-xs font-bold text-brass-700">
              {a.ruleName}
            </span>
            <Link
              className="font-semibold text-kelp-500 underline"
              to={`/categories/${encodeURIComponent(a.categorySlug)}/items/${encodeURIComponent(a.sku)}`}
            >
              {a.headline}
            </Link>
            {showCategory ? <span className="text-ink-500">{a.categoryName}</span> : null}
          </div>
          <p className="mt-1 text-ink-700">{a.evidence.reason}</p>
          {a.evidence.phrases?.length ? (
            <p className="mt-1 text-xs text-ink-700">
              Recurring phrases: {a.evidence.phrases.map((p) => `“${p.phrase}” ×${p.count}`).join(', ')}
            </p>
          ) : null}
          <p className="mt-1 text-xs text-ink-500">
            {format(new Date(a.raisedAt), 'd MMM yyyy HH:mm')} · week {a.isoWeek} · {sourceLabel[a.source]}
            {a.importBatchId ? (
              <>
                {' '}
                ·{' '}
                <Link className="underline" to={`/imports?batch=${a.importBatchId}`}>
                  import #{a.importBatchId}
                </Link>
              </>
            ) : null}
            {a.snapshotId ? ` · snapshot #${a.snapshotId}` : ''}
            {a.evidence.before ? ` · before: #${String(a.evidence.before.rank)}` : ''}
            {` · now: #${String(a.evidence.after.rank)} on ${String(a.evidence.after.reviews)} reviews`}
            {a.mail ? ` · ${mailLabel[a.mail] ?? a.mail}` : ''}
          </p>
        </li>
      ))}
    </ul>
  );
}
