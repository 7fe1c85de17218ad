import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createApp } from '../../../server/app';
import { loadConfig } from '../../../server/config/env';
import { demoAccounts } from '../../../server/runtime/seed';
import { csrfFor, setupTestApp, type TestApp } from '../../helpers/test-app';

let t: TestApp;
beforeAll(async () => {
  t = await setupTestApp();
});
afterAll(async () => t.close());

const admin = demoAccounts.find((a) => a.role === 'admin')!;

function sessionCookie(res: request.Response): string {
  const cookies = ([] as string[]).concat(res.headers['set-cookie'] ?? []);
  return cookies.find((c) => c.startsWith('ballast.sid='))!;
}

describe('the session cookie', () => {
  it('is HttpOnly and SameSite=Lax, and not Secure over plain HTTP', async () => {
    const agent = request.agent(t.app);
    const csrf = await csrfFor(agent);
    const res = await agent.post('/api/auth/sign-in').set('x-csrf-token', csrf).send(admin).expect(200);
    const cookie = sessionCookie(res);
    expect(cookie).toMatch(/HttpOnly/);
    expect(cookie).toMatch(/SameSite=Lax/);
    expect(cookie).not.toMatch(/Secure/);
  });

  it('is Secure behind a TLS-terminating proxy', async () => {
    const config = loadConfig({
      NODE_ENV: 'test',
      DATABASE_URL: t.db.url,
      SESSION_SECRET: 'test-secret-of-ballast',
      TRUST_PROXY: 'true',
    });
    const app = createApp({ config, sequelize: t.db.sequelize });
    const first = await request(app).get('/api/auth/csrf').set('x-forwarded-proto', 'https').expect(200);
    expect(sessionCookie(first)).toMatch(/; Secure/);
    // A Secure cookie is not sent back over plain HTTP by a client, so the test carries it by hand.
    const res = await request(app)
      .post('/api/auth/sign-in')
      .set('x-forwarded-proto', 'https')
      .set('cookie', sessionCookie(first).split(';')[0]!)
      .set('x-csrf-token', (first.body as { csrfToken: string }).csrfToken)
      .send(admin)
      .expect(200);
    expect(sessionCookie(res)).toMatch(/; Secure/);
    (app.locals.shutdown as () => void)();
  });

  it('sends security headers, including a content security policy without inline scripts', async () => {
    const res = await request(t.app).get('/api/health');
    expect(res.headers['content-security-policy']).toMatch(/script-src 'self'(;|$)/);
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['x-frame-options']).toBe('SAMEORIGIN');
    expect(res.headers['x-powered-by']).toBeUndefined();
  });
});
