import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { roleCodes, type RoleCode } from '../../shared/auth';
import { apiRoutes } from '../../server/modules/registry';
import { setupTestApp, type Agent, type TestApp } from '../helpers/test-app';

type Allowed = 'public' | 'signed-in' | readonly RoleCode[];

/**
 * Who may call each API route, written out by hand. Every registered route must appear here, so a new
 * route cannot ship without someone deciding its access.
 */
const expected: Record<string, Allowed> = {
  'GET /api/health': 'public',
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
  'GET /api/portfolio': 'signed-in',
  'GET /api/categories/:slug/weeks': 'signed-in',
  'GET /api/categories/:slug/standings': 'signed-in',
  'GET /api/categories/:slug/standings.csv': 'signed-in',
  'GET /api/categories/:slug/drift': 'signed-in',
  'GET /api/categories/:slug/freshness': 'signed-in',
  'GET /api/categories/:slug/items/:sku': 'signed-in',
  'GET /api/categories/:slug/what-if': 'signed-in',
  'GET /api/categories/:slug/settings': 'signed-in',
  'PUT /api/categories/:slug/settings': ['manager', 'admin'],
  'GET /api/categories/:slug/calibration-notes': 'signed-in',
  'POST /api/categories/:slug/calibration-notes': ['analyst', 'manager', 'admin'],
  'POST /api/score': 'signed-in',
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
