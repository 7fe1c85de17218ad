import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { User } from '../../../server/db/models';
import { demoAccounts } from '../../../server/runtime/seed';
import { setupTestApp, type TestApp } from '../../helpers/test-app';

let t: TestApp;
beforeAll(async () => {
  // Address throttle allows 3 × 5 failures, more than this file sends.
  t = await setupTestApp({ LOGIN_MAX_ATTEMPTS: '5' });
});
afterAll(async () => t.close());

const analyst = demoAccounts.find((a) => a.role === 'analyst')!;

describe('account lockout under parallel guesses', () => {
  it('counts every one of twelve parallel wrong guesses: five get through, the rest meet the lock', async () => {
    const agent = await t.anonymous();
    const guesses = Array.from({ length: 12 }, (_, i) =>
      agent
        .post('/api/auth/sign-in')
        .set('x-csrf-token', agent.csrf)
        .send({ email: analyst.email, password: `wrong-guess-${i}` }),
    );
    const statuses = (await Promise.all(guesses)).map((res) => res.status);
    expect(statuses.filter((s) => s === 401)).toHaveLength(5);
    expect(statuses.filter((s) => s === 423)).toHaveLength(7);

    const right = await agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', agent.csrf)
      .send({ email: analyst.email, password: analyst.password });
    expect(right.status).toBe(423);
    await User.update({ failedLogins: 0, lockedUntil: null }, { where: { email: analyst.email } });
  });
});
