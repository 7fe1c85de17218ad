import type { Express } from 'express';
import request from 'supertest';
import type { RoleCode } from '../../shared/auth';
import { createApp } from '../../server/app';
import { loadConfig } from '../../server/config/env';
import { setLogLevel } from '../../server/lib/logger';
import { demoAccounts, seedDemo } from '../../server/runtime/seed';
import { createTestDatabase, type TestDatabase } from './test-db';

export type Agent = ReturnType<typeof request.agent> & { csrf: string };

export type TestApp = {
  app: Express;
  db: TestDatabase;
  /** A cookie-holding client signed in as the demo account of a role, with its CSRF token. */
  signIn: (role: RoleCode) => Promise<Agent>;
  anonymous: () => Promise<Agent>;
  close: () => Promise<void>;
};

export async function csrfFor(agent: ReturnType<typeof request.agent>): Promise<string> {
  const res = await agent.get('/api/auth/csrf').expect(200);
  return (res.body as { csrfToken: string }).csrfToken;
}

export async function setupTestApp(env: Record<string, string> = {}): Promise<TestApp> {
  setLogLevel('silent');
  const db = await createTestDatabase();
  await seedDemo(() => {});
  const config = loadConfig({
    NODE_ENV: 'test',
    DATABASE_URL: db.url,
    SESSION_SECRET: 'test-secret-of-ballast',
    ...env,
  });
  const app = createApp({ config, sequelize: db.sequelize });

  const anonymous = async (): Promise<Agent> => {
    const agent = request.agent(app) as Agent;
    agent.csrf = await csrfFor(agent);
    return agent;
  };
  const signIn = async (role: RoleCode): Promise<Agent> => {
    const account = demoAccounts.find((a) => a.role === role)!;
    const agent = await anonymous();
    const res = await agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', agent.csrf)
      .send({ email: account.email, password: account.password })
      .expect(200);
    agent.csrf = (res.body as { csrfToken: string }).csrfToken;
    return agent;
  };
  return {
    app,
    db,
    signIn,
    anonymous,
    close: async () => {
      (app.locals.shutdown as () => void)();
      await db.drop();
    },
  };
}
