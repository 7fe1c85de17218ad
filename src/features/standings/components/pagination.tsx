export function Pagination({
  page,
  pageSize,
  total,
  onPage,
  onPageSize,
}: {
  page: number;
  pageSize: number;
  total: number;
  onPage: (page: number) => void;
  onPageSize: (size: number) => void;
}) {
  const pages = Math.max(1, Math.ceil(total / pageSize));
  const from = total === 0 ? 0 : (page - 1) * pageSize + 1;
  const to = Math.min(total, page * pageSize);
  const btn =
    'rounded-md px-3 py-1.5 text-sm font-semibold ring-1 ring-ink-200 bg-white hover:bg-ink-50 disabled:cursor-not-allowed disabled:text-ink-300';
  return (
    <nav
      aria-label="Pages of the standings"
      className="mt-3 flex flex-wrap items-center justify-between gap-3 text-sm"
    >
      <p className="text-ink-500" aria-live="polite">
        Items <span className="font-mono">{from}</span>–<span className="font-mono">{to}</span> of{' '}
        <span className="font-mono">{total}</span>
      </p>
      <div className="flex items-center gap-2">
        <label className="text-ink-500">
          Rows
          <select
            className="ml-2 rounded-md border border-ink-200 bg-white px-1.5 py-1"
            value={pageSize}
            onChange={(e) => onPageSize(Number(e.target.value))}
          >
            {[25, 50, 100, 200].map((n) => (
              <option key={n}>{n}</option>
            ))}
          </select>
        </label>
        <button type="button" className={btn} disabled={page <= 1} onClick={() => onPage(page - 1)}>
          Previous
        </button>
        <span className="font-mono text-ink-700">
          {page} / {pages}
        </span>
        <button type="button" className={btn} disabled={page >= pages} onClick={() => onPage(page + 1)}>
          Next
        </button>
      </div>
    </nav>
  );
}
