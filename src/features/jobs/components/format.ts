import { format } from 'date-fns';

export function formatWhen(iso: string | null): string {
  return iso ? format(new Date(iso), 'yyyy-MM-dd HH:mm:ss') : '—';
}

export function formatDuration(ms: number | null): string {
  if (ms === null) return '—';
  if (ms < 1000) return `${ms} ms`;
  if (ms < 60_000) return `${(ms / 1000).toFixed(1)} s`;
  return `${Math.floor(ms / 60_000)} min ${Math.round((ms % 60_000) / 1000)} s`;
}
