import { afterEach, describe, expect, it, vi } from 'vitest';
import { throttleSessionTouch } from '../../../server/modules/auth/session-touch';

afterEach(() => vi.useRealTimers());

describe('throttleSessionTouch', () => {
  it("renews a session's expiry at most once a minute and answers every caller", () => {
    vi.useFakeTimers({ now: new Date('2026-12-02T09:00:00Z') });
    const renewed: string[] = [];
    const store = throttleSessionTouch({
      touch: (sid: string, _data: unknown, callback?: (err: unknown) => void) => {
        renewed.push(sid);
        callback?.(null);
      },
    });
    const answered: string[] = [];
    const touch = (sid: string) => store.touch(sid, {}, () => answered.push(sid));

    touch('a');
    touch('a');
    vi.advanceTimersByTime(30_000);
    touch('b');
    vi.advanceTimersByTime(29_000);
    touch('a');
    expect(renewed).toEqual(['a', 'b']);
    vi.advanceTimersByTime(1_000);
    touch('a');
    touch('b');
    expect(renewed).toEqual(['a', 'b', 'a']);
    vi.advanceTimersByTime(30_000);
    touch('b');
    expect(renewed).toEqual(['a', 'b', 'a', 'b']);
    // express-session waits for the callback before it ends the response: every call must get it.
    expect(answered).toHaveLength(7);
  });
});
