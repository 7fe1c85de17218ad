import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { roleCodes, type RoleCode } from '../../shared/auth';
import { tokenRoles, type CreatedToken, type TokenRole } from '../../shared/schemas/tokens.schema';
import { apiRoutes } from '../../server/modules/registry';
import { setupTestApp, type Agent, type TestApp } from '../helpers/test-app';

type Allowed = 'public' | 'signed-in' | readonly RoleCode[];

/**
 * Who may call each API route, written out by hand. Every registered route must appear here, so a new
 * route cannot ship without someone deciding its access.
 */
const expected: Record<string, Allowed> = {
  'GET /api/health': 'public',
  'GET /api/categories/:slug/alert-rules': 'signed-in',
  'PUT /api/categories/:slug/alert-rules/:rule': ['manager', 'admin'],
  'DELETE /api/categories/:slug/alert-rules/:rule': ['manager', 'admin'],
  'GET /api/categories/:slug/alerts': 'signed-in',
  'GET /api/me/alerts': 'signed-in',
  'GET /api/me/alert-settings': 'signed-in',
  'PUT /api/me/alert-settings/choices': 'signed-in',
  'PUT /api/me/alert-settings/quiet-hours': 'signed-in',
  'GET /api/admin/webhooks': ['admin'],
  'POST /api/admin/webhooks': ['admin'],
  'PATCH /api/admin/webhooks/:id': ['admin'],
  'DELETE /api/admin/webhooks/:id': ['admin'],
  'GET /api/admin/webhooks/:id/deliveries': ['admin'],
  'POST /api/admin/webhook-deliveries/:id/resend': ['admin'],
  'GET /api/admin/landing': ['admin'],
  'GET /api/openapi.json': 'public',
  'GET /api/auth/csrf': 'public',
  'POST /api/auth/sign-in': 'public',
  'POST /api/auth/sign-out': 'signed-in',
  'GET /api/me': 'signed-in',
  'GET /api/categories': 'signed-in',
  'GET /api/categories/:slug': 'signed-in',
  'PUT /api/admin/categories/:slug/owners': ['admin'],
  'GET /api/admin/users': ['admin'],
  'POST /api/admin/users': ['admin'],
  'PATCH /api/admin/users/:id': ['admin'],
  'GET /api/admin/audit': ['admin'],
  'GET /api/schedules': ['ops', 'admin'],
  'GET /api/schedules/preview': ['ops', 'admin'],
  'POST /api/schedules': ['ops', 'admin'],
  'GET /api/schedules/:id': ['ops', 'admin'],
  'PATCH /api/schedules/:id': ['ops', 'admin'],
  'DELETE /api/schedules/:id': ['ops', 'admin'],
  'POST /api/schedules/:id/run-now': ['ops', 'admin'],
  'GET /api/jobs': ['ops', 'admin'],
  'GET /api/jobs/:id': ['ops', 'admin'],
  'POST /api/jobs/:id/retry': ['ops', 'admin'],
  'POST /api/jobs/backfill': ['ops', 'admin'],
  'POST /api/imports/preview': ['admin', 'ops', 'manager'],
  'POST /api/imports': ['admin', 'ops', 'manager'],
  'GET /api/imports': ['admin', 'ops', 'manager'],
  'GET /api/imports/:id': ['admin', 'ops', 'manager'],
  'GET /api/imports/:id/errors.csv': ['admin', 'ops', 'manager'],
  'POST /api/ingest/reviews': ['admin', 'ops', 'manager'],
  'POST /api/ingest/aggregates': ['admin', 'ops', 'manager'],
  'GET /api/admin/tokens': ['admin'],
  'POST /api/admin/tokens': ['admin'],
  'DELETE /api/admin/tokens/:id': ['admin'],
  'PUT /api/admin/tokens/:id/owner': ['admin'],
  'GET /api/portfolio': 'signed-in',
  'GET /api/categories/:slug/weeks': 'signed-in',
  'GET /api/categories/:slug/standings': 'signed-in',
  'GET /api/categories/:slug/standings.csv': 'signed-in',
  'GET /api/categories/:slug/standings.xlsx': 'signed-in',
  'GET /api/categories/:slug/drift': 'signed-in',
  'GET /api/categories/:slug/freshness': 'signed-in',
  'GET /api/categories/:slug/items/:sku': 'signed-in',
  'GET /api/categories/:slug/what-if': 'signed-in',
  'GET /api/categories/:slug/settings': 'signed-in',
  'PUT /api/categories/:slug/settings': ['manager', 'admin'],
  'GET /api/categories/:slug/calibration-notes': 'signed-in',
  'POST /api/categories/:slug/calibration-notes': ['analyst', 'manager', 'admin'],
  'POST /api/score': 'signed-in',
  'POST /api/calibrations': 'signed-in',
  'GET /api/categories/:slug/digests': 'signed-in',
  'GET /api/categories/:slug/digests/:week/pdf': 'signed-in',
  'GET /api/portfolio/digests': ['admin', 'ops', 'analyst', 'exec'],
  'GET /api/portfolio/digests/:week/pdf': ['admin', 'ops', 'analyst', 'exec'],
  'POST /api/digests/produce': ['admin', 'ops'],
  'GET /api/outbox': ['admin', 'ops'],
  'GET /api/outbox/:id': ['admin', 'ops'],
  'GET /api/outbox/:id/html': ['admin', 'ops'],
  'GET /api/outbox/:id/attachments/:index': ['admin', 'ops'],
  'GET /api/deliveries': ['admin', 'ops'],
  'POST /api/deliveries/:id/resend': ['admin', 'ops'],
  'GET /api/me/digests': 'signed-in',
  'PUT /api/me/digests': 'signed-in',
  'GET /api/unsubscribe': 'public',
  'POST /api/unsubscribe': 'public',
};

/** Category-scoped routes: a manager reaches the categories they own and gets 403 on the others. */
const ownedSlug = 'kettles-and-brewers';
const foreignSlug = 'desk-lighting';

const key = (method: string, path: string) => `${method.toUpperCase()} ${path}`;

function fill(path: string, slug: string): string {
  return path.replace(':slug', slug).replace(':id', '4');
}

let t: TestApp;
const agents = new Map<RoleCode | 'anonymous', Agent>();

beforeAll(async () => {
  t = await setupTestApp();
  agents.set('anonymous', await t.anonymous());
  for (const role of roleCodes) agents.set(role, await t.signIn(role));
});
afterAll(async () => t.close());

async function call(agent: Agent, method: string, path: string) {
  const req = agent[method as 'get'](path);
  return method === 'get' ? req : req.set('x-csrf-token', agent.csrf).send({});
}

describe('role matrix over every registered API route', () => {
  it('lists every registered route in the expected table, and nothing else', () => {
    const registered = apiRoutes.map((r) => key(r.method, r.path)).sort();
    expect(registered).toEqual(Object.keys(expected).sort());
  });

  for (const def of apiRoutes) {
    const allowed = expected[key(def.method, def.path)];
    it(`${key(def.method, def.path)} answers each role as expected`, async () => {
      for (const who of ['anonymous', ...roleCodes] as const) {
        // Signing out ends the session, so that call gets a throw-away agent.
        const agent =
          def.path === '/api/auth/sign-out' && who !== 'anonymous' ? await t.signIn(who) : agents.get(who)!;
        const res = await call(agent, def.method, fill(def.path, ownedSlug));
        const label = `${who} → ${def.method.toUpperCase()} ${def.path}: ${res.status}`;
        if (allowed === 'public') expect([401, 403], label).not.toContain(res.status);
        else if (who === 'anonymous') expect(res.status, label).toBe(401);
        else if (allowed === 'signed-in' || allowed?.includes(who))
          expect([401, 403], label).not.toContain(res.status);
        else expect(res.status, label).toBe(403);
      }
    });
  }

  it('keeps a category manager out of categories they do not own', async () => {
    const manager = agents.get('manager')!;
    const scoped = apiRoutes.filter((r) => r.access.kind === 'roles' && r.access.category);
    expect(scoped.length).toBeGreaterThan(0);
    for (const def of scoped) {
      const allowedRoles = expected[key(def.method, def.path)];
      if (allowedRoles !== 'signed-in' && !allowedRoles?.includes('manager')) continue;
      const own = await call(manager, def.method, fill(def.path, ownedSlug));
      const foreign = await call(manager, def.method, fill(def.path, foreignSlug));
      expect(own.status, `own ${def.path}`).not.toBe(403);
      expect(foreign.status, `foreign ${def.path}`).toBe(403);
      expect(foreign.body.error.message).toBe('This category is not one of yours.');
    }
    const list = await manager.get('/api/categories').expect(200);
    expect((list.body as { slug: string }[]).map((c) => c.slug).sort()).toEqual([
      'kettles-and-brewers',
      'portable-power',
    ]);
  });
});

describe('role matrix over every registered API route, by API token', () => {
  // Created here rather than in the file's beforeAll: the session matrix above calls
  // DELETE /api/admin/tokens/4 as the administrator, and these tokens must outlive it.
  const tokens = new Map<TokenRole, string>();
  let revoked = '';
  let scopedOps = '';

  async function createToken(body: object): Promise<CreatedToken> {
    const admin = agents.get('admin')!;
    const res = await admin.post('/api/admin/tokens').set('x-csrf-token', admin.csrf).send(body).expect(201);
    return res.body as CreatedToken;
  }

  beforeAll(async () => {
    const owned = (await t.db.sequelize.query('SELECT id FROM categories WHERE slug = ?', {
      replacements: [ownedSlug],
      plain: true,
    })) as { id: number };
    for (const role of tokenRoles) {
      // A manager token must name its categories: the one the demo manager owns.
      const categoryIds = role === 'manager' ? [owned.id] : null;
      tokens.set(role, (await createToken({ name: `Matrix ${role}`, role, categoryIds })).secret);
    }
    scopedOps = (await createToken({ name: 'Matrix scoped ops', role: 'ops', categoryIds: [owned.id] }))
      .secret;
    const gone = await createToken({ name: 'Matrix revoked', role: 'ops' });
    const admin = agents.get('admin')!;
    await admin.delete(`/api/admin/tokens/${gone.token.id}`).set('x-csrf-token', admin.csrf).expect(200);
    revoked = gone.secret;
  });

  function callWithToken(secret: string, method: string, path: string, slug = ownedSlug) {
    const req = request(t.app)[method as 'get'](fill(path, slug)).set('authorization', `Bearer ${secret}`);
    return method === 'get' ? req : req.send({});
  }

  for (const def of apiRoutes) {
    const allowed = expected[key(def.method, def.path)];
    const name = key(def.method, def.path);
    it(`${name} answers each token role as the role's session does, or 403 where tokens are refused`, async () => {
      const tokensAllowed = def.access.kind === 'roles' && def.access.tokens === true;
      for (const role of tokenRoles) {
        const res = await callWithToken(tokens.get(role)!, def.method, def.path);
        const label = `${role} token → ${name}: ${res.status}`;
        if (allowed === 'public') expect([401, 403], label).not.toContain(res.status);
        else if (!tokensAllowed) expect(res.status, label).toBe(403);
        else if (allowed === 'signed-in' || allowed?.includes(role)) {
          // The same call with the role's cookie session: a token acts as its role, no more, no less.
          const session = await call(agents.get(role)!, def.method, fill(def.path, ownedSlug));
          expect([401, 403], label).not.toContain(res.status);
          expect(res.status, label).toBe(session.status);
        } else expect(res.status, label).toBe(403);
      }
      if (allowed !== 'public') {
        const res = await callWithToken(revoked, def.method, def.path);
        expect(res.status, `revoked token → ${name}`).toBe(401);
        expect(res.body.error.message, name).toContain('was revoked');
      }
    });
  }

  it('lets some routes take tokens, so the comparison above is not empty', () => {
    const open = apiRoutes.filter((r) => r.access.kind === 'roles' && r.access.tokens === true);
    expect(open.map((r) => key(r.method, r.path)).sort()).toEqual([
      'POST /api/calibrations',
      'POST /api/ingest/aggregates',
      'POST /api/ingest/reviews',
      'POST /api/score',
    ]);
  });

  it('keeps a token limited to one category out of the others', async () => {
    const scoped = apiRoutes.filter((r) => r.access.kind === 'roles' && r.access.category);
    for (const def of scoped) {
      for (const secret of [scopedOps, tokens.get('manager')!]) {
        const foreign = await callWithToken(secret, def.method, def.path, foreignSlug);
        expect(foreign.status, `foreign ${def.path}`).toBe(403);
      }
    }
    // Ingest names the category in each row: rows for a foreign category are refused, the rest written.
    const row = (reviewId: string, category: string, sku: string) => ({
      reviewId,
      sku,
      title: 'Matrix Scope Item',
      category,
      stars: 4,
      reviewedAt: '2026-06-01',
    });
    for (const secret of [scopedOps, tokens.get('manager')!]) {
      const res = await request(t.app)
        .post('/api/ingest/reviews')
        .set('authorization', `Bearer ${secret}`)
        .send({
          mode: 'valid_rows',
          rows: [
            row(`mx-own-${secret.slice(5, 12)}`, ownedSlug, 'KE-MX1'),
            row(`mx-far-${secret.slice(5, 12)}`, foreignSlug, 'DE-MX1'),
          ],
        })
        .expect(200);
      expect(res.body).toMatchObject({ rowsRead: 2, rowsAccepted: 1, rowsRejected: 1 });
      expect(res.body.errors[0].reason).toBe(`not one of your categories: ${foreignSlug}`);
    }
  });
});
