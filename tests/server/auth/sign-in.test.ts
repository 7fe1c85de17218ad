import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, Session, User } from '../../../server/db/models';
import { demoAccounts } from '../../../server/runtime/seed';
import { setupTestApp, type TestApp } from '../../helpers/test-app';

let t: TestApp;
beforeAll(async () => {
  t = await setupTestApp({ LOGIN_MAX_ATTEMPTS: '3' });
});
afterAll(async () => t.close());

const manager = demoAccounts.find((a) => a.role === 'manager')!;

describe('POST /api/auth/sign-in', () => {
  it('signs in each demo role and GET /api/me answers with that role', async () => {
    for (const account of demoAccounts) {
      const agent = await t.signIn(account.role);
      const me = await agent.get('/api/me').expect(200);
      expect(me.body).toMatchObject({ email: account.email, role: account.role });
    }
  });

  it('answers a wrong password with 401 and a clear message, no stack trace', async () => {
    const agent = await t.anonymous();
    const res = await agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', agent.csrf)
      .send({ email: manager.email, password: 'not-the-password' })
      .expect(401);
    expect(res.body).toEqual({
      error: { code: 'unauthenticated', message: 'That e-mail and password do not match an account.' },
    });
    expect(JSON.stringify(res.body)).not.toMatch(/at .*\.ts/);
    await User.update({ failedLogins: 0 }, { where: { email: manager.email } });
  });

  it('refuses a sign-in without the CSRF token', async () => {
    const agent = await t.anonymous();
    const res = await agent
      .post('/api/auth/sign-in')
      .send({ email: manager.email, password: manager.password });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf_invalid');
  });

  it('gives a new session id at sign-in, so a session id seen before is useless', async () => {
    const agent = await t.anonymous();
    const before = await Session.findAll({ attributes: ['sid'] });
    await agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', agent.csrf)
      .send({ email: manager.email, password: manager.password })
      .expect(200);
    const after = await Session.findAll({ attributes: ['sid'] });
    const fresh = after.map((s) => s.sid).filter((sid) => !before.some((b) => b.sid === sid));
    expect(fresh).toHaveLength(1);
    // The pre-sign-in session that held only the CSRF token is gone.
    expect(after.length).toBe(before.length);
  });

  it('locks the account after too many failed attempts, with a message saying so', async () => {
    const agent = await t.anonymous();
    for (let i = 0; i < 3; i += 1) {
      await agent
        .post('/api/auth/sign-in')
        .set('x-csrf-token', agent.csrf)
        .send({ email: manager.email, password: `wrong-${i}` })
        .expect(401);
    }
    const locked = await agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', agent.csrf)
      .send({ email: manager.email, password: manager.password })
      .expect(423);
    expect(locked.body.error.code).toBe('account_locked');
    expect(locked.body.error.message).toMatch(/locked after too many failed sign-ins/);
    const events = await AuditEvent.count({
      where: { action: 'auth.sign_in_failed', actorEmail: manager.email },
    });
    expect(events).toBeGreaterThanOrEqual(4);
    await User.update({ failedLogins: 0, lockedUntil: null }, { where: { email: manager.email } });
  });
});

describe('POST /api/auth/sign-out', () => {
  it('ends the session: the same cookie then gets 401 with a clear message', async () => {
    const agent = await t.signIn('analyst');
    await agent.post('/api/auth/sign-out').set('x-csrf-token', agent.csrf).expect(204);
    const res = await agent.get('/api/me').expect(401);
    expect(res.body.error.message).toMatch(/not signed in, or your session has ended/);
    const audit = await AuditEvent.count({ where: { action: 'auth.sign_out' } });
    expect(audit).toBe(1);
  });

  it('treats a session whose user was disabled as ended (401)', async () => {
    const agent = await t.signIn('exec');
    await User.update({ active: false }, { where: { role: 'exec' } });
    await agent.get('/api/me').expect(401);
    await User.update({ active: true }, { where: { role: 'exec' } });
  });
});

// Last in the file: once the address is throttled, no other sign-in from it succeeds.
describe('sign-in throttle', () => {
  it('throttles an address that keeps failing', async () => {
    const agent = await t.anonymous();
    const statuses: number[] = [];
    // Unknown e-mails never lock an account, so only the address throttle can stop these.
    for (let i = 0; i < 12; i += 1) {
      const res = await agent
        .post('/api/auth/sign-in')
        .set('x-csrf-token', agent.csrf)
        .send({ email: `nobody${i}@example.test`, password: 'whatever-password' });
      statuses.push(res.status);
      if (res.status === 429) {
        expect(res.body.error.message).toMatch(/Too many failed sign-ins from this address/);
        break;
      }
    }
    // Earlier tests in this file already spent some of this address's allowance (limit: 3 × 3 failures).
    expect(statuses[0]).toBe(401);
    expect(statuses.at(-1)).toBe(429);
  });
});
