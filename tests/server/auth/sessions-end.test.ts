import type { Express } from 'express';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../../server/app';
import { loadConfig } from '../../../server/config/env';
import { User } from '../../../server/db/models';
import { demoAccounts } from '../../../server/runtime/seed';
import { csrfFor, setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';

// Two app servers on one database, as in production behind a load balancer.
let t: TestApp;
let second: Express;
let admin: Agent;
beforeAll(async () => {
  t = await setupTestApp();
  second = createApp({
    config: loadConfig({
      NODE_ENV: 'test',
      DATABASE_URL: t.db.url,
      SESSION_SECRET: 'test-secret-of-ballast',
    }),
    sequelize: t.db.sequelize,
  });
  admin = await t.signIn('admin');
});
afterAll(async () => {
  (second.locals.shutdown as () => void)();
  await t.close();
});

const analyst = demoAccounts.find((a) => a.role === 'analyst')!;

async function signInOn(app: Express, email: string, password: string): Promise<Agent> {
  const agent = request.agent(app) as Agent;
  agent.csrf = await csrfFor(agent);
  const res = await agent
    .post('/api/auth/sign-in')
    .set('x-csrf-token', agent.csrf)
    .send({ email, password })
    .expect(200);
  agent.csrf = (res.body as { csrfToken: string }).csrfToken;
  return agent;
}

async function analystId(): Promise<number> {
  return (await User.findOne({ where: { email: analyst.email }, rejectOnEmpty: true })).id;
}

async function patchAnalyst(body: Record<string, unknown>): Promise<void> {
  await admin
    .patch(`/api/admin/users/${await analystId()}`)
    .set('x-csrf-token', admin.csrf)
    .send(body)
    .expect(200);
}

describe('sessions end when credentials change', () => {
  it('an admin password reset ends every session of the user on both servers; the admin stays signed in', async () => {
    const sessions = await Promise.all([
      signInOn(t.app, analyst.email, analyst.password),
      signInOn(t.app, analyst.email, analyst.password),
      signInOn(second, analyst.email, analyst.password),
      signInOn(second, analyst.email, analyst.password),
    ]);
    for (const s of sessions) await s.get('/api/me').expect(200);
    await patchAnalyst({ name: 'Ana Renamed' });
    for (const s of sessions) await s.get('/api/me').expect(200);

    await patchAnalyst({ password: 'a-fresh-reset-password' });

    const after = await Promise.all(sessions.map((s) => s.get('/api/me')));
    expect(after.map((r) => r.status)).toEqual([401, 401, 401, 401]);
    await admin.get('/api/me').expect(200);

    const fresh = await signInOn(second, analyst.email, 'a-fresh-reset-password');
    await fresh.get('/api/me').expect(200);
    await patchAnalyst({ password: analyst.password });
  });

  it('disabling a user ends their sessions for good: re-enabling does not bring them back', async () => {
    const before = await signInOn(second, analyst.email, analyst.password);
    await before.get('/api/me').expect(200);

    await patchAnalyst({ active: false });
    await before.get('/api/me').expect(401);
    await patchAnalyst({ active: true });

    await before.get('/api/me').expect(401);
    const again = await signInOn(t.app, analyst.email, analyst.password);
    await again.get('/api/me').expect(200);
  });
});
