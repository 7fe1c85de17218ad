import { countOf } from '../../../../shared/plural';
import type { ImportPreview } from '../../../../shared/schemas/imports-api.schema';

const delimiterWords = { comma: 'comma', semicolon: 'semicolon', tab: 'tab' } as const;

/** The first rows exactly as the import will read them: mapped columns, values as stored, errors per row. */
export function PreviewTable({ preview }: { preview: ImportPreview }) {
  if (preview.fileError)
    return (
      <div
        role="alert"
        className="rounded-lg border border-coral-500/40 bg-coral-100 px-4 py-3 text-sm text-ink-900"
      >
        <p className="font-semibold">Ballast cannot import this file.</p>
        <p className="mt-1">{preview.fileError.message}</p>
      </div>
    );
  const columns = preview.header.flatMap((h) => (h.column ? [h.column] : []));
  const bad = preview.rows.filter((r) => r.error).length;
  return (
    <div>
      <p className="mb-2 text-sm text-ink-700" data-testid="preview-summary">
        Read as {preview.delimiter ? delimiterWords[preview.delimiter] : 'CSV'}-separated, {columns.length}{' '}
        columns recognised. {preview.more ? 'First' : 'All'} {countOf(preview.rows.length, 'row')}
        {preview.more ? ' (the file has more)' : ''}:{' '}
        <span className="font-semibold text-kelp-500">{preview.rows.length - bad} readable</span>
        {bad > 0 ? (
          <>
            , <span className="font-semibold text-coral-500">{bad} with mistakes</span>
          </>
        ) : null}
        .
      </p>
      {preview.warnings.map((w) => (
        <p key={w} className="mb-2 text-sm text-brass-700">
          {w}
        </p>
      ))}
      <div className="relative max-h-[28rem] overflow-auto rounded-lg border border-ink-100 bg-white">
        <table className="w-full text-left text-xs">
          <caption className="sr-only">Preview of the first rows of the file</caption>
          <thead className="sticky top-0 bg-ink-50 text-ink-700">
            <tr>
              <th scope="col" className="px-2 py-2 font-semibold">
                Line
              </th>
              {columns.map((c) => (
                <th key={c} scope="col" className="px-2 py-2 font-mono font-semibold whitespace-nowrap">
                  {c}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {preview.rows.map((row) => (
              <tr key={row.line} className={`border-t border-ink-100 ${row.error ? 'bg-coral-100/60' : ''}`}>
                <td className="px-2 py-1.5 font-mono text-ink-500">{row.line}</td>
                {row.error ? (
                  <td colSpan={columns.length} className="px-2 py-1.5 text-ink-900">
                    <span className="font-semibold text-coral-500">
                      {row.error.column ? `${row.error.column}: ` : ''}
                    </span>
                    {row.error.reason}
                    {row.error.raw ? (
                      // What the row held, as plain text (React escapes it), so the mistake can be found.
                      <code
                        className="mt-1 block max-w-full overflow-x-auto font-mono text-[11px] whitespace-pre text-ink-700"
                        data-testid="preview-raw"
                      >
                        {row.error.raw}
                      </code>
                    ) : null}
                  </td>
                ) : (
                  columns.map((c) => (
                    <td
                      key={c}
                      className="max-w-[16rem] truncate px-2 py-1.5 text-ink-900"
                      title={row.values?.[c]}
                    >
                      {row.values?.[c] ?? ''}
                    </td>
                  ))
                )}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
