import type { Express } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../../server/app';
import { loadConfig } from '../../../server/config/env';
import { csrfFor, setupTestApp, type TestApp } from '../../helpers/test-app';

// LOGIN_MAX_ATTEMPTS 2: the address throttle allows 3 × 2 = 6 failed sign-ins per window, all servers together.
const env = { LOGIN_MAX_ATTEMPTS: '2' };
let t: TestApp;
let second: Express;
beforeAll(async () => {
  t = await setupTestApp(env);
  second = createApp({
    config: loadConfig({
      NODE_ENV: 'test',
      DATABASE_URL: t.db.url,
      SESSION_SECRET: 'test-secret-of-ballast',
      ...env,
    }),
    sequelize: t.db.sequelize,
  });
});
afterAll(async () => {
  (second.locals.shutdown as () => void)();
  await t.close();
});

async function wrongSignIn(app: Express, i: number): Promise<number> {
  const agent = request.agent(app);
  const csrf = await csrfFor(agent);
  const res = await agent
    .post('/api/auth/sign-in')
    .set('x-csrf-token', csrf)
    .send({ email: `nobody-${i}@example.test`, password: 'not-a-password' });
  return res.status;
}

describe('sign-in throttle per address, shared by two app servers on one database', () => {
  it('counts failures on both servers together: the seventh is refused whichever server gets it', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < 8; i++) statuses.push(await wrongSignIn(i % 2 === 0 ? t.app : second, i));
    expect(statuses).toEqual([401, 401, 401, 401, 401, 401, 429, 429]);
  });
});
