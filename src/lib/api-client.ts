import type { ApiErrorBody } from '../../shared/auth';

/** An answer from the API that was not a success, with the server's own message. */
export class ApiError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'ApiError';
  }
}

let csrfToken: string | undefined;

export function rememberCsrfToken(token: string | undefined): void {
  csrfToken = token;
}

async function fetchCsrfToken(): Promise<string> {
  const res = await fetch('/api/auth/csrf', { credentials: 'same-origin' });
  const body = (await res.json()) as { csrfToken: string };
  csrfToken = body.csrfToken;
  return csrfToken;
}

function toError(status: number, body: unknown): ApiError {
  const error = (body as Partial<ApiErrorBody> | null)?.error;
  if (error) return new ApiError(status, error.code, error.message, error.details);
  if (status >= 500)
    return new ApiError(status, 'server', 'Ballast could not answer just now. Try again shortly.');
  return new ApiError(status, 'unknown', `The request failed (${status}).`);
}

// Whether this browser held a signed-in session, so the sign-in page says "Your session has ended" only when
// one did end, never on a first visit. Kept in localStorage so that every tab of the browser agrees.
const sessionMark = 'ballast.hadSession';

function storage(): Storage | undefined {
  try {
    return window.localStorage;
  } catch {
    return undefined;
  }
}

export function rememberSession(signedIn: boolean): void {
  if (signedIn) storage()?.setItem(sessionMark, '1');
  else storage()?.removeItem(sessionMark);
}

/**
 * Whether this browser held a session: set by a successful sign-in or /api/me, cleared only by signing out,
 * so every redirect of one ended session (several requests may meet the 401) says the same.
 */
export function sessionEnded(): boolean {
  return storage()?.getItem(sessionMark) === '1';
}

/** The sign-in address that brings the reader back to `next`, with the notice only when a session ended. */
export function signInPath(next: string): string {
  return `/sign-in?next=${encodeURIComponent(next)}${sessionEnded() ? '&ended=1' : ''}`;
}

function goToSignIn(): void {
  if (window.location.pathname === '/sign-in') return;
  window.location.assign(signInPath(window.location.pathname + window.location.search));
}

type Options = {
  method?: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  body?: unknown;
  redirectOn401?: boolean;
};

/** The one way the browser talks to the server: JSON in and out, CSRF token on writes, 401 to sign-in. */
export async function api<T>(
  path: string,
  { method = 'GET', body, redirectOn401 = true }: Options = {},
): Promise<T> {
  const send = async (): Promise<Response> => {
    const headers: Record<string, string> = { accept: 'application/json' };
    if (body !== undefined) headers['content-type'] = 'application/json';
    if (method !== 'GET') headers['x-csrf-token'] = csrfToken ?? (await fetchCsrfToken());
    return fetch(path, {
      method,
      headers,
      credentials: 'same-origin',
      body: body === undefined ? undefined : JSON.stringify(body),
    });
  };
  let res: Response;
  try {
    res = await send();
    if (res.status === 403 && method !== 'GET') {
      const peek = (await res
        .clone()
        .json()
        .catch(() => null)) as Partial<ApiErrorBody> | null;
      if (peek?.error?.code === 'csrf_invalid') {
        await fetchCsrfToken();
        res = await send();
      }
    }
  } catch {
    throw new ApiError(0, 'network', 'Ballast cannot be reached. Check your connection and try again.');
  }
  if (res.status === 204) return undefined as T;
  const payload: unknown = await res.json().catch(() => null);
  if (!res.ok) {
    if (res.status === 401 && redirectOn401) goToSignIn();
    throw toError(res.status, payload);
  }
  return payload as T;
}

/**
 * Sends a multipart form (a file upload) with the CSRF token; the answer is read like `api`'s. The browser
 * sets the multipart content type and boundary itself.
 */
export async function upload<T>(path: string, form: FormData): Promise<T> {
  const send = async (): Promise<Response> =>
    fetch(path, {
      method: 'POST',
      headers: { accept: 'application/json', 'x-csrf-token': csrfToken ?? (await fetchCsrfToken()) },
      credentials: 'same-origin',
      body: form,
    });
  let res: Response;
  try {
    res = await send();
    if (res.status === 403) {
      const peek = (await res
        .clone()
        .json()
        .catch(() => null)) as Partial<ApiErrorBody> | null;
      if (peek?.error?.code === 'csrf_invalid') {
        await fetchCsrfToken();
        res = await send();
      }
    }
  } catch {
    throw new ApiError(0, 'network', 'Ballast cannot be reached. Check your connection and try again.');
  }
  const payload: unknown = await res.json().catch(() => null);
  if (!res.ok) {
    if (res.status === 401) goToSignIn();
    throw toError(res.status, payload);
  }
  return payload as T;
}
