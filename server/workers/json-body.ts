import type { z } from 'zod';

/** A JSON body's failure as plain data, to cross the thread boundary; workers/pool.ts turns it back. */
export type JsonBodyFailure =
  | { ok: false; kind: 'json' }
  | { ok: false; kind: 'invalid'; issues: { code: string; path: (string | number)[]; message: string }[] };

/**
 * In a worker thread: reads JSON bytes as express.json would on the event loop (no body is `{}`, the
 * text must start with an object or an array) and checks them against the route's schema.
 */
export function parseJsonBytes<S extends z.ZodType>(
  schema: S,
  bytes: Uint8Array | null,
): { ok: true; value: z.infer<S> } | JsonBodyFailure {
  let value: unknown = {};
  if (bytes && bytes.byteLength > 0) {
    const text = new TextDecoder().decode(bytes);
    const first = /^[ \t\n\r]*(.)/s.exec(text)?.[1];
    if (first !== '{' && first !== '[') return { ok: false, kind: 'json' };
    try {
      value = JSON.parse(text);
    } catch {
      return { ok: false, kind: 'json' };
    }
  }
  const checked = schema.safeParse(value);
  if (checked.success) return { ok: true, value: checked.data };
  return {
    ok: false,
    kind: 'invalid',
    issues: checked.error.issues.map((i) => ({
      code: i.code,
      path: i.path.filter((p): p is string | number => typeof p !== 'symbol'),
      message: i.message,
    })),
  };
}
