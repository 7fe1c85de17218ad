import type { ReactNode } from 'react';
import { ApiError } from '../../lib/api-client';

export function Loading({ label = 'Loading…' }: { label?: string }) {
  return (
    <div role="status" aria-live="polite" className="flex items-center gap-3 py-10 text-ink-500">
      <span
        className="h-4 w-4 animate-spin rounded-full border-2 border-ink-200 border-t-brass-500"
        aria-hidden
      />
      <span>{label}</span>
    </div>
  );
}

export function EmptyState({ title, children }: { title: string; children?: ReactNode }) {
  return (
    <div className="rounded-lg border border-dashed border-ink-200 bg-white/60 px-6 py-10 text-center">
      <p className="font-semibold text-ink-800">{title}</p>
      {children ? <div className="mt-2 text-sm text-ink-500">{children}</div> : null}
    </div>
  );
}

export function errorMessage(error: unknown): string {
  if (error instanceof ApiError) return error.message;
  if (error instanceof Error) return error.message;
  return 'Something went wrong.';
}

/** A refusal or a missing thing will not change by trying again, so it gets no retry button. */
function errorHeading(error: unknown): { heading: string; retry: boolean } {
  if (error instanceof ApiError && error.status === 403)
    return { heading: 'Not available to you.', retry: false };
  if (error instanceof ApiError && error.status === 404) return { heading: 'Not found.', retry: false };
  return { heading: 'This could not be loaded.', retry: true };
}

export function ErrorPanel({ error, onRetry }: { error: unknown; onRetry?: () => void }) {
  const { heading, retry } = errorHeading(error);
  return (
    <div
      role="alert"
      className="rounded-lg border border-coral-500/40 bg-coral-100 px-4 py-3 text-sm text-ink-900"
    >
      <p className="font-semibold">{heading}</p>
      <p className="mt-1">{errorMessage(error)}</p>
      {onRetry && retry ? (
        <button type="button" className="mt-2 font-semibold text-ink-700 underline" onClick={onRetry}>
          Try again
        </button>
      ) : null}
    </div>
  );
}
