import { standingsSortColumns, type StandingsSort } from '../../../../shared/schemas/standings.schema';
import type { StandingsView } from '../api/get-standings';

const sorts = new Set<string>(standingsSortColumns);
const intOrUndefined = (v: string | null) =>
  v !== null && v.trim() !== '' && /^-?\d+$/.test(v) ? Number(v) : undefined;

/** The standings view a URL describes; unknown values fall back to the defaults rather than fail. */
export function viewFromParams(params: URLSearchParams): StandingsView {
  const sort = params.get('sort') ?? 'smoothedRank';
  const flags = (params.get('flags') ?? '')
    .split(',')
    .filter((f) => ['stale', 'thin', 'cluster', 'mover'].includes(f));
  return {
    week: params.get('week') || undefined,
    sort: (sorts.has(sort) ? sort : 'smoothedRank') as StandingsSort,
    dir: params.get('dir') === 'desc' ? 'desc' : 'asc',
    flags: flags.length > 0 ? flags.join(',') : undefined,
    q: params.get('q')?.trim() || undefined,
    driftMin: intOrUndefined(params.get('driftMin')),
    driftMax: intOrUndefined(params.get('driftMax')),
    page: Math.max(1, intOrUndefined(params.get('page')) ?? 1),
    pageSize: [25, 50, 100, 200].includes(intOrUndefined(params.get('pageSize')) ?? 0)
      ? Number(params.get('pageSize'))
      : 50,
  };
}
