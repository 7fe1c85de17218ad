import { useState } from 'react';
import { importKinds, type ImportKind } from '../../../../shared/schemas/import.schema';
import {
  importModeLabels,
  importModes,
  type ImportMode,
} from '../../../../shared/schemas/imports-api.schema';
import { RouteError } from '../../../components/errors/route-error';
import { WidgetBoundary } from '../../../components/errors/widget-boundary';
import { Button } from '../../../components/ui/button';
import { PageHeader } from '../../../components/ui/page-header';
import { ErrorPanel, Loading, errorMessage } from '../../../components/ui/status';
import { useImport } from '../../../features/imports/api/get-import';
import { importsQueryOptions, useImports } from '../../../features/imports/api/get-imports';
import { usePreviewImport } from '../../../features/imports/api/preview-import';
import { useStartImport } from '../../../features/imports/api/start-import';
import { FileDrop } from '../../../features/imports/components/file-drop';
import { HistoryTable } from '../../../features/imports/components/history-table';
import { ImportStatus } from '../../../features/imports/components/import-status';
import { PreviewTable } from '../../../features/imports/components/preview-table';
import { queryClient } from '../../../lib/query-client';

export async function loader() {
  await queryClient.ensureQueryData(importsQueryOptions());
  return null;
}

const kindWords: Record<ImportKind, { label: string; hint: string }> = {
  reviews: { label: 'Reviews', hint: 'one row per review' },
  aggregates: { label: 'Aggregates', hint: 'counts and mean per item and date' },
};

const modeHints: Record<ImportMode, string> = {
  all_or_nothing: 'If any row has a mistake, nothing is written; fix the file and try again.',
  valid_rows: 'Rows with mistakes are left out and listed for download; the rest are written.',
};

function Choice<T extends string>({
  legend,
  name,
  options,
  value,
  onChange,
  describe,
}: {
  legend: string;
  name: string;
  options: readonly T[];
  value: T;
  onChange: (value: T) => void;
  describe: (value: T) => { label: string; hint: string };
}) {
  return (
    <fieldset>
      <legend className="mb-2 text-sm font-semibold text-ink-800">{legend}</legend>
      <div className="grid gap-2 sm:grid-cols-2">
        {options.map((option) => {
          const { label, hint } = describe(option);
          return (
            <label
              key={option}
              className={`flex cursor-pointer gap-3 rounded-md border px-3 py-2 text-sm ${
                value === option
                  ? 'border-brass-500 bg-brass-100/50'
                  : 'border-ink-100 bg-white hover:border-ink-200'
              }`}
            >
              <input
                type="radio"
                name={name}
                value={option}
                checked={value === option}
                onChange={() => onChange(option)}
                className="mt-1 accent-ink-900"
              />
              <span>
                <span className="block font-semibold text-ink-900">{label}</span>
                <span className="block text-ink-500">{hint}</span>
              </span>
            </label>
          );
        })}
      </div>
    </fieldset>
  );
}

export function Component() {
  const [file, setFile] = useState<File | null>(null);
  const [kind, setKind] = useState<ImportKind>('reviews');
  const [mode, setMode] = useState<ImportMode>('all_or_nothing');
  const [batchId, setBatchId] = useState<number | null>(null);
  const preview = usePreviewImport();
  const start = useStartImport();
  const batch = useImport(batchId);
  const history = useImports();

  const choose = (next: File, nextKind = kind) => {
    setFile(next);
    setBatchId(null);
    start.reset();
    preview.mutate({ file: next, kind: nextKind });
  };
  const commit = () => {
    if (!file) return;
    start.mutate({ file, kind, mode }, { onSuccess: (created) => setBatchId(created.id) });
  };
  const canCommit = file && preview.data && !preview.data.fileError && preview.data.rows.length > 0;

  return (
    <>
      <PageHeader
        title="Imports"
        lead="Bring reviews or aggregate counts in from a CSV file. Ballast shows how it reads the first rows before anything is written, and re-importing the same file adds nothing."
      />
      <div className="grid grid-cols-[minmax(0,1fr)] gap-6">
        <section
          aria-labelledby="file-heading"
          className="grid gap-4 rounded-lg border border-ink-100 bg-white/70 p-5"
        >
          <h2 id="file-heading" className="text-lg font-bold text-ink-900">
            1. Choose the file
          </h2>
          <Choice
            legend="What the file holds"
            name="kind"
            options={importKinds}
            value={kind}
            onChange={(next) => {
              setKind(next);
              if (file) choose(file, next);
            }}
            describe={(k) => kindWords[k]}
          />
          <FileDrop file={file} onFile={(next) => choose(next)} />
        </section>

        {file ? (
          <section aria-labelledby="preview-heading" className="grid grid-cols-[minmax(0,1fr)] gap-3">
            <h2 id="preview-heading" className="text-lg font-bold text-ink-900">
              2. Check how Ballast reads it
            </h2>
            {preview.isPending ? <Loading label="Reading the first rows…" /> : null}
            {preview.isError ? <ErrorPanel error={preview.error} /> : null}
            {preview.data ? <PreviewTable preview={preview.data} /> : null}
          </section>
        ) : null}

        {canCommit ? (
          <section
            aria-labelledby="commit-heading"
            className="grid gap-4 rounded-lg border border-ink-100 bg-white/70 p-5"
          >
            <h2 id="commit-heading" className="text-lg font-bold text-ink-900">
              3. Import
            </h2>
            <Choice
              legend="When some rows have mistakes"
              name="mode"
              options={importModes}
              value={mode}
              onChange={setMode}
              describe={(m) => ({ label: importModeLabels[m], hint: modeHints[m] })}
            />
            <div className="flex flex-wrap items-center gap-3">
              <Button onClick={commit} disabled={start.isPending || batch.data?.status === 'running'}>
                {start.isPending ? 'Uploading…' : `Import ${file.name}`}
              </Button>
              {start.isError ? (
                <p role="alert" className="text-sm text-coral-500">
                  {errorMessage(start.error)}
                </p>
              ) : null}
            </div>
          </section>
        ) : null}

        {batch.data ? <ImportStatus batch={batch.data} /> : null}

        <section aria-labelledby="history-heading">
          <h2 id="history-heading" className="mb-3 text-lg font-bold text-ink-900">
            Import history
          </h2>
          <WidgetBoundary label="import history">
            {history.isPending ? <Loading /> : null}
            {history.isError ? (
              <ErrorPanel error={history.error} onRetry={() => void history.refetch()} />
            ) : null}
            {history.data ? <HistoryTable batches={history.data} /> : null}
          </WidgetBoundary>
        </section>
      </div>
    </>
  );
}

export const ErrorBoundary = RouteError;
