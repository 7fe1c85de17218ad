import {
  createColumnHelper,
  flexRender,
  getCoreRowModel,
  useReactTable,
  type SortingState,
} from '@tanstack/react-table';
import { Link } from 'react-router-dom';
import type { StandingsRow, StandingsSort } from '../../../../shared/schemas/standings.schema';
import { countOf } from '../../../../shared/plural';
import { standingsColumns as label, rankWords } from '../../../../shared/vocabulary';
import { FlagBadge } from '../../../components/ui/flag-badge';
import { fmt } from '../../../lib/format';

const col = createColumnHelper<StandingsRow>();

function Drift({ value }: { value: number }) {
  const tone = value > 0 ? 'text-kelp-500' : value < 0 ? 'text-coral-500' : 'text-ink-500';
  const arrow = value > 0 ? '▲' : value < 0 ? '▼' : '';
  return (
    <span className={`font-mono font-semibold ${tone}`} title="naive rank − smoothed rank">
      <span aria-hidden className="mr-0.5 text-[10px]">
        {arrow}
      </span>
      {fmt.signed(value)}
    </span>
  );
}

export function buildColumns(slug: string, week: string | undefined, rankLevel: number | null = null) {
  const num = 'text-right font-mono tabular-nums';
  return [
    col.accessor('smoothedRank', {
      id: 'smoothedRank',
      header: label.smoothedRank.label,
      meta: { className: num },
      cell: (c) => <span className="font-semibold text-ink-900">{c.getValue()}</span>,
    }),
    col.display({
      id: 'rankRange',
      header: label.rankRange.label,
      meta: { className: 'text-right font-mono tabular-nums whitespace-nowrap' },
      cell: ({ row: { original: r } }) =>
        r.rankLow === null || r.rankHigh === null ? (
          <span className="text-ink-300" title="Not computed for this week">
            –
          </span>
        ) : (
          <span
            data-testid="rank-range"
            className="text-ink-700"
            title={`${rankWords.meaning(rankLevel ?? 0.9)}${r.topShare === null ? '' : ` ${label.topShare.label}: ${fmt.pct(r.topShare)}.`}${r.aboveAheadShare === null ? '' : ` ${label.aboveAheadShare.label}: ${fmt.pct(r.aboveAheadShare)}.`}`}
          >
            {rankWords.range(r.rankLow, r.rankHigh)}
          </span>
        ),
    }),
    col.accessor('naiveRank', { id: 'naiveRank', header: label.naiveRank.label, meta: { className: num } }),
    col.accessor('drift', {
      id: 'drift',
      header: label.drift.label,
      meta: { className: num },
      cell: (c) => <Drift value={c.getValue()} />,
    }),
    col.accessor('title', {
      id: 'title',
      header: label.title.label,
      meta: { className: 'min-w-[14rem]' },
      cell: (c) => (
        <Link
          to={`/categories/${slug}/items/${encodeURIComponent(c.row.original.sku)}${week ? `?week=${week}` : ''}`}
          className="group block"
        >
          <span className="block font-semibold text-ink-900 group-hover:underline">{c.getValue()}</span>
          <span className="font-mono text-xs text-ink-500">{c.row.original.sku}</span>
        </Link>
      ),
    }),
    col.accessor('n', { id: 'n', header: label.n.label, meta: { className: num } }),
    col.accessor('rawMean', {
      id: 'rawMean',
      header: label.rawMean.label,
      meta: { className: num },
      cell: (c) => fmt.num(c.getValue(), 2),
    }),
    col.accessor('smoothed', {
      id: 'smoothed',
      header: label.smoothed.label,
      meta: { className: num },
      cell: (c) => <span className="font-semibold">{fmt.num(c.getValue(), 3)}</span>,
    }),
    col.accessor('lowerBound', {
      id: 'lowerBound',
      header: label.lowerBound.label,
      meta: { className: num },
      cell: (c) => fmt.num(c.getValue(), 3),
    }),
    col.accessor('newestAgeDays', {
      id: 'newestAgeDays',
      header: label.newestAgeDays.label,
      meta: { className: 'text-right whitespace-nowrap' },
      cell: (c) => fmt.age(c.getValue()),
    }),
    col.display({
      id: 'flags',
      header: label.flags.label,
      cell: ({ row: { original: r } }) => (
        <span className="flex flex-wrap gap-1">
          {r.stale ? <FlagBadge flag="stale" reason={r.staleReason} /> : null}
          {r.thin ? <FlagBadge flag="thin" reason={countOf(r.n, 'review')} /> : null}
          {r.negativeCluster ? <FlagBadge flag="cluster" reason={r.clusterReason} /> : null}
          {r.mover ? (
            <FlagBadge
              flag="mover"
              reason={`moved ${fmt.signed(r.smoothedMovement)} ${Math.abs(r.smoothedMovement ?? 0) === 1 ? 'place' : 'places'} (smoothed) since last week`}
            />
          ) : null}
        </span>
      ),
    }),
  ];
}

const sortable = new Set<string>([
  'smoothedRank',
  'rankRange',
  'naiveRank',
  'drift',
  'title',
  'n',
  'rawMean',
  'smoothed',
  'lowerBound',
  'newestAgeDays',
]);

/** The server sorts and pages; the table only shows the page and asks for another sort through the URL. */
export function StandingsTable({
  slug,
  week,
  rows,
  rankLevel = null,
  sort,
  dir,
  onSort,
  caption,
}: {
  slug: string;
  week: string | undefined;
  rows: StandingsRow[];
  rankLevel?: number | null;
  sort: StandingsSort;
  dir: 'asc' | 'desc';
  onSort: (sort: StandingsSort, dir: 'asc' | 'desc') => void;
  caption: string;
}) {
  const sorting: SortingState = [{ id: sort, desc: dir === 'desc' }];
  // TanStack Table returns functions the React Compiler cannot memoise; this table re-renders with its data.
  // eslint-disable-next-line react-hooks/incompatible-library
  const table = useReactTable({
    data: rows,
    columns: buildColumns(slug, week, rankLevel),
    state: { sorting },
    manualSorting: true,
    manualPagination: true,
    enableSortingRemoval: false,
    getCoreRowModel: getCoreRowModel(),
    getRowId: (r) => r.sku,
  });

  return (
    <div
      className="max-w-full overflow-x-auto rounded-lg border border-ink-100 bg-white"
      data-testid="standings-frame"
    >
      <table className="w-full min-w-[60rem] text-sm">
        <caption className="sr-only">{caption}</caption>
        <thead className="sticky top-0 bg-ink-50 text-left text-xs uppercase text-ink-700">
          {table.getHeaderGroups().map((group) => (
            <tr key={group.id}>
              {group.headers.map((header) => {
                const id = header.column.id;
                const active = id === sort;
                const className =
                  (header.column.columnDef.meta as { className?: string } | undefined)?.className ?? '';
                const label = flexRender(header.column.columnDef.header, header.getContext());
                return (
                  <th
                    key={header.id}
                    scope="col"
                    aria-sort={
                      active
                        ? dir === 'asc'
                          ? 'ascending'
                          : 'descending'
                        : sortable.has(id)
                          ? 'none'
                          : undefined
                    }
                    className={`px-2 py-2 font-semibold ${className.includes('text-right') ? 'text-right' : ''}`}
                  >
                    {sortable.has(id) ? (
                      <button
                        type="button"
                        className={`inline-flex items-center gap-1 rounded px-1 py-0.5 uppercase hover:bg-ink-100 ${active ? 'text-ink-900' : ''}`}
                        onClick={() =>
                          onSort(
                            id as StandingsSort,
                            active
                              ? dir === 'asc'
                                ? 'desc'
                                : 'asc'
                              : id === 'drift' ||
                                  id === 'n' ||
                                  id === 'smoothed' ||
                                  id === 'rawMean' ||
                                  id === 'lowerBound'
                                ? 'desc'
                                : 'asc',
                          )
                        }
                      >
                        {label}
                        <span
                          aria-hidden
                          className={`text-[10px] ${active ? 'text-brass-700' : 'text-ink-300'}`}
                        >
                          {active ? (dir === 'asc' ? '▲' : '▼') : '↕'}
                        </span>
                      </button>
                    ) : (
                      label
                    )}
                  </th>
                );
              })}
            </tr>
          ))}
        </thead>
        <tbody>
          {table.getRowModel().rows.map((row) => (
            <tr key={row.id} className="border-t border-ink-50 hover:bg-paper">
              {row.getVisibleCells().map((cell) => (
                <td
                  key={cell.id}
                  className={`px-2 py-2 align-top ${(cell.column.columnDef.meta as { className?: string } | undefined)?.className ?? ''}`}
                >
                  {flexRender(cell.column.columnDef.cell, cell.getContext())}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
