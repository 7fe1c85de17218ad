import type { ImportBatchRecord } from '../../../../shared/schemas/imports-api.schema';
import { errorsCsvUrl, isRunning } from '../api/get-import';
import { importedNothing, outcomeSentence, rejectedDownload, rowAccount } from '../outcome';
import { formatSize } from './file-drop';

const statusWords: Record<ImportBatchRecord['status'], string> = {
  queued: 'Waiting to start',
  running: 'Importing',
  succeeded: 'Imported',
  failed: 'Stopped',
  rejected: 'Not imported',
};

export const statusTone: Record<ImportBatchRecord['status'], string> = {
  queued: 'bg-ink-100 text-ink-700',
  running: 'bg-brass-100 text-ink-900',
  succeeded: 'bg-kelp-500/15 text-kelp-500',
  failed: 'bg-coral-100 text-coral-500',
  rejected: 'bg-coral-100 text-coral-500',
};

/** The badge of an import; one that finished without storing a row says so rather than "Imported". */
export function StatusBadge({ batch }: { batch: ImportBatchRecord }) {
  const nothing = importedNothing(batch);
  const tone = nothing ? statusTone.rejected : statusTone[batch.status];
  return (
    <span
      className={`inline-block rounded-full px-2 py-0.5 text-xs font-semibold whitespace-nowrap ${tone}`}
      data-testid="import-status-badge"
    >
      {nothing ? 'Nothing imported' : statusWords[batch.status]}
    </span>
  );
}

function Figure({
  label,
  value,
  tone = 'text-ink-900',
  note,
}: {
  label: string;
  value: number;
  tone?: string;
  note?: string;
}) {
  return (
    <div className="rounded-md bg-paper px-3 py-2" title={note}>
      <dt className="text-xs tracking-wide text-ink-500 uppercase">{label}</dt>
      <dd
        className={`text-2xl font-bold tabular-nums ${tone}`}
        data-testid={`result-${label.toLowerCase().replace(/ /g, '-')}`}
      >
        {value.toLocaleString('en')}
      </dd>
      {note ? <dd className="mt-0.5 text-xs text-ink-500">{note}</dd> : null}
    </div>
  );
}

/** Progress while an import runs, then its result; it keeps running on the server if the page is closed. */
export function ImportStatus({ batch }: { batch: ImportBatchRecord }) {
  const running = isRunning(batch);
  const { heldBack, unchanged } = rowAccount(batch);
  const download = rejectedDownload(batch.rowsRejected);
  const share = batch.fileBytes ? Math.min(1, batch.bytesDone / batch.fileBytes) : 0;
  return (
    <section
      aria-labelledby="import-status-heading"
      aria-busy={running}
      className="rounded-lg border border-ink-100 bg-white p-5"
    >
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 id="import-status-heading" className="text-lg font-bold text-ink-900">
          {batch.fileName ?? `Import ${batch.id}`}
        </h2>
        <StatusBadge batch={batch} />
      </div>
      {running ? (
        <div className="mt-4">
          <div
            role="progressbar"
            aria-label="Import progress"
            aria-valuemin={0}
            aria-valuemax={100}
            aria-valuenow={Math.round(share * 100)}
            className="h-2 overflow-hidden rounded-full bg-ink-100"
          >
            <div
              className="h-full bg-brass-500 transition-all"
              style={{ width: `${Math.round(share * 100)}%` }}
            />
          </div>
          <p className="mt-2 text-sm text-ink-500" aria-live="polite">
            {formatSize(batch.bytesDone)} of {formatSize(batch.fileBytes ?? 0)} read,{' '}
            {batch.rowsRead.toLocaleString('en')} rows so far. You can leave this page: the import carries on.
          </p>
        </div>
      ) : (
        <p role="status" className="mt-2 text-sm text-ink-700" data-testid="import-outcome">
          {outcomeSentence(batch)}
        </p>
      )}
      {/* Read = accepted + rejected + not written; accepted = new + updated + unchanged. */}
      <dl className="mt-4 grid grid-cols-2 gap-2 sm:grid-cols-3 lg:grid-cols-7">
        <Figure label="Read" value={batch.rowsRead} note="rows, blank lines not counted" />
        <Figure
          label="Accepted"
          value={batch.rowsAccepted}
          tone={batch.rowsAccepted ? 'text-kelp-500' : undefined}
        />
        <Figure
          label="Rejected"
          value={batch.rowsRejected}
          tone={batch.rowsRejected ? 'text-coral-500' : undefined}
          note="rows with mistakes"
        />
        <Figure
          label="Not written"
          value={heldBack}
          note={
            heldBack === 0
              ? undefined
              : batch.mode === 'all_or_nothing'
                ? 'good rows, held back: all or nothing'
                : 'read before the stop, not written'
          }
        />
        <Figure label="New" value={batch.rowsInserted} />
        <Figure label="Updated" value={batch.rowsUpdated} />
        <Figure label="Unchanged" value={unchanged} note="already stored as sent" />
      </dl>
      {!running && batch.rowsRejected > 0 ? (
        <a
          href={errorsCsvUrl(batch.id)}
          download
          className="mt-4 inline-flex items-center gap-2 rounded-md bg-white px-3.5 py-2 text-sm font-semibold text-ink-900 ring-1 ring-ink-200 hover:bg-ink-50"
        >
          {download.label}
        </a>
      ) : null}
    </section>
  );
}
