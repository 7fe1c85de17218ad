import { format } from 'date-fns';
import type { DigestRecord } from '../../../../shared/schemas/digests.schema';

/** Weekly digests newest first; choosing one shows it in the preview. */
export function DigestTimeline({
  digests,
  selected,
  onSelect,
}: {
  digests: DigestRecord[];
  selected: number | undefined;
  onSelect: (id: number) => void;
}) {
  return (
    <ol className="space-y-2" aria-label="Weekly digests">
      {digests.map((d) => (
        <li key={d.id}>
          <button
            type="button"
            onClick={() => onSelect(d.id)}
            aria-current={selected === d.id ? 'true' : undefined}
            className={`w-full rounded-md border px-3 py-2 text-left text-sm ${
              selected === d.id
                ? 'border-brass-500 bg-brass-100/60'
                : 'border-ink-100 bg-white hover:bg-ink-50'
            }`}
          >
            <span className="font-mono font-semibold text-ink-900">{d.isoWeek}</span>
            <span className="ml-2 text-ink-500">
              {d.pageCount} pages · {d.paper === 'LETTER' ? 'US Letter' : 'A4'}
            </span>
            <span className="block text-xs text-ink-500">
              Made {format(new Date(d.createdAt), 'd MMM yyyy HH:mm')} · mail sent {d.deliveries.sent}
              {d.deliveries.queued ? `, waiting ${d.deliveries.queued}` : ''}
              {d.deliveries.failed ? `, failed ${d.deliveries.failed}` : ''}
            </span>
          </button>
        </li>
      ))}
    </ol>
  );
}
