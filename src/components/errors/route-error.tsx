import { isRouteErrorResponse, Link, useRouteError } from 'react-router-dom';
import { ApiError } from '../../lib/api-client';

/** Shown in place of a screen whose loader or render failed; the shell around it stays usable. */
export function RouteError() {
  const error = useRouteError();
  let title = 'This screen could not be shown';
  let message = 'Something went wrong. Reload the page, or go back to the overview.';
  if (error instanceof ApiError) {
    if (error.status === 403) title = 'Not available to you';
    if (error.status === 404) title = 'Not found';
    message = error.message;
  } else if (isRouteErrorResponse(error)) {
    title = error.status === 404 ? 'Not found' : title;
    message = error.statusText || message;
  }
  return (
    <div role="alert" className="mx-auto max-w-xl py-16 text-center">
      <h1 className="text-2xl font-bold text-ink-900">{title}</h1>
      <p className="mt-3 text-ink-500">{message}</p>
      <Link to="/" className="mt-6 inline-block font-semibold text-ink-700 underline">
        Back to the overview
      </Link>
    </div>
  );
}
