type TouchingStore = {
  touch: (sid: string, data: unknown, callback?: (err: unknown) => void) => void;
};

/** How often one session's expiry in MariaDB is renewed at most. */
export const sessionTouchEveryMs = 60_000;

/**
 * express-session renews a rolling session's expiry in the store after every request: with the sessions
 * in MariaDB, one UPDATE per API call. A session lasts twelve hours, so renewing it once a minute per
 * server is plenty; the cookie itself is still renewed on every response.
 */
export function throttleSessionTouch<S extends TouchingStore>(store: S, everyMs = sessionTouchEveryMs): S {
  const touch = store.touch.bind(store);
  const lastTouched = new Map<string, number>();
  store.touch = (sid, data, callback) => {
    const now = Date.now();
    if (now - (lastTouched.get(sid) ?? 0) < everyMs) {
      callback?.(null);
      return;
    }
    // Bounded: forgetting a session only means its next request renews it a little early.
    if (lastTouched.size >= 10_000) lastTouched.clear();
    lastTouched.set(sid, now);
    touch(sid, data, callback);
  };
  return store;
}
