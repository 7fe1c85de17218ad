import { format } from 'date-fns';
import type { ImportBatchRecord } from '../../../../shared/schemas/imports-api.schema';
import { importModeLabels } from '../../../../shared/schemas/imports-api.schema';
import { EmptyState } from '../../../components/ui/status';
import { errorsCsvUrl } from '../api/get-import';
import { rejectedDownload } from '../outcome';
import { StatusBadge } from './import-status';

const sourceWords: Record<ImportBatchRecord['source'], string> = {
  upload: 'Upload',
  api: 'Ingest API',
  demo: 'Demo',
  command: 'Command',
};

export function HistoryTable({ batches }: { batches: ImportBatchRecord[] }) {
  if (batches.length === 0)
    return (
      <EmptyState title="No imports yet">
        Files you import and data sent with API tokens appear here.
      </EmptyState>
    );
  // relative: the sr-only texts inside are positioned; without it they widen the page at 390 px.
  return (
    <div className="relative overflow-x-auto rounded-lg border border-ink-100 bg-white">
      <table className="w-full text-sm">
        <caption className="sr-only">Import history, newest first</caption>
        <thead className="bg-ink-50 text-left text-ink-700">
          <tr>
            {[
              'When',
              'Who',
              'File or source',
              'Kind',
              'Mode',
              'Read',
              'Accepted',
              'Rejected',
              'New',
              'Updated',
              'Status',
            ].map((h) => (
              <th key={h} scope="col" className="px-3 py-2 whitespace-nowrap">
                {h}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {batches.map((b) => (
            <tr key={b.id} className="border-t border-ink-100">
              <td className="px-3 py-2 whitespace-nowrap text-ink-700">
                {format(new Date(b.createdAt), 'd MMM yyyy HH:mm')}
              </td>
              <td className="px-3 py-2">{b.who ?? '—'}</td>
              <td className="max-w-[14rem] truncate px-3 py-2" title={b.fileName ?? undefined}>
                {b.fileName ?? sourceWords[b.source]}
              </td>
              <td className="px-3 py-2">{b.kind}</td>
              <td className="px-3 py-2 whitespace-nowrap">{importModeLabels[b.mode]}</td>
              <td className="px-3 py-2 text-right tabular-nums">{b.rowsRead.toLocaleString('en')}</td>
              <td className="px-3 py-2 text-right tabular-nums">{b.rowsAccepted.toLocaleString('en')}</td>
              <td className="px-3 py-2 text-right tabular-nums">
                {b.rowsRejected > 0 ? (
                  <a className="font-semibold text-coral-500 underline" href={errorsCsvUrl(b.id)} download>
                    {b.rowsRejected.toLocaleString('en')}
                    <span className="sr-only">
                      {' '}
                      rejected rows, download as CSV
                      {rejectedDownload(b.rowsRejected).kept < b.rowsRejected
                        ? ` (the first ${rejectedDownload(b.rowsRejected).kept.toLocaleString('en-GB')})`
                        : ''}
                    </span>
                  </a>
                ) : (
                  0
                )}
              </td>
              <td className="px-3 py-2 text-right tabular-nums">{b.rowsInserted.toLocaleString('en')}</td>
              <td className="px-3 py-2 text-right tabular-nums">{b.rowsUpdated.toLocaleString('en')}</td>
              <td className="px-3 py-2" title={b.errorMessage ?? undefined}>
                <StatusBadge batch={b} />
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
