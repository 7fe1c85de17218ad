import { QueryTypes } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { db } from '../../../server/db/sequelize';
import { apiRoutes } from '../../../server/modules/registry';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';
import { tablesExceptSessions } from '../../helpers/test-db';

/*
 * Every state-changing route in the registry, called with a signed-in admin's cookie as a forged page
 * would call it: without the CSRF token, with a token of another session, and with a made-up one. Each
 * must answer 403 `csrf_invalid` and change nothing. The only writes allowed without the token are the
 * sessionless ones a mail client makes (one-click unsubscribe, RFC 8058), which carry their own signed
 * token and no cookie, and API-token calls, which carry no cookie either.
 */

let t: TestApp;
let admin: Agent;
let other: Agent;

const writes = apiRoutes.filter((r) => r.method !== 'get' && !r.sessionless);

function pathOf(path: string): string {
  return path.replace(/:(\w+)/g, (_, name: string) => (name === 'slug' ? 'trail-packs' : '1'));
}

async function counts(): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const name of await tablesExceptSessions()) {
    const [row] = (await db().query(`SELECT COUNT(*) AS n FROM \`${name}\``, {
      type: QueryTypes.SELECT,
    })) as { n: number }[];
    out[name] = Number(row!.n);
  }
  return out;
}

beforeAll(async () => {
  t = await setupTestApp();
  admin = await t.signIn('admin');
  other = await t.signIn('ops');
}, 120_000);
afterAll(async () => t.close());

describe('CSRF on every state-changing cookie request', () => {
  it('knows the writes of every module', () => {
    expect(writes.length).toBeGreaterThanOrEqual(20);
    expect(writes.map((r) => `${r.method.toUpperCase()} ${r.path}`)).toEqual(
      expect.arrayContaining([
        'POST /api/auth/sign-out',
        'POST /api/admin/users',
        'PUT /api/categories/:slug/settings',
        'POST /api/imports',
        'POST /api/ingest/reviews',
        'POST /api/admin/tokens',
        'DELETE /api/schedules/:id',
        'PUT /api/me/digests',
      ]),
    );
  });

  it('refuses each without a valid token for this session, and nothing changes', async () => {
    const before = await counts();
    const wrong = [undefined, other.csrf, 'made-up-token-of-a-forged-page'];
    const refused: string[] = [];
    for (const r of writes) {
      for (const token of wrong) {
        let req = admin[r.method](pathOf(r.path)).set('origin', 'https://forged.example.test');
        if (token) req = req.set('x-csrf-token', token);
        const res = await req.send({});
        if (res.status !== 403 || res.body?.error?.code !== 'csrf_invalid')
          refused.push(
            `${r.method} ${r.path} token=${token ?? 'none'} → ${res.status} ${res.text.slice(0, 120)}`,
          );
      }
    }
    expect(refused).toEqual([]);
    expect(await counts()).toEqual(before);
    // The admin is still signed in: a refused forgery does not end the session either.
    await admin.get('/api/me').expect(200);
  });

  it("accepts the same request with the session's own token", async () => {
    const res = await admin
      .post('/api/categories/trail-packs/calibration-notes')
      .set('x-csrf-token', admin.csrf)
      .send({});
    // Past the CSRF check: the body is now what is wrong.
    expect(res.status).toBe(400);
    expect(res.body.error.code).not.toBe('csrf_invalid');
  });

  it('lets a mail client unsubscribe with one click: form body, no cookie, no CSRF token', async () => {
    const res = await (
      await t.anonymous()
    )
      .post('/api/unsubscribe?token=not-a-real-token')
      .type('form')
      .send('List-Unsubscribe=One-Click');
    // Reaches the handler, which refuses the forged link on its signature rather than on CSRF.
    expect(res.status).toBe(400);
    expect(res.body.error.code).not.toBe('csrf_invalid');
  });
});
