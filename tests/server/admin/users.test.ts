import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';

let t: TestApp;
let admin: Agent;
beforeAll(async () => {
  t = await setupTestApp();
  admin = await t.signIn('admin');
});
afterAll(async () => t.close());

describe('POST /api/admin/users', () => {
  it('creates a person who can then sign in with the given role', async () => {
    const created = await admin
      .post('/api/admin/users')
      .set('x-csrf-token', admin.csrf)
      .send({
        email: 'Nia.New@Example.test',
        name: 'Nia New',
        role: 'analyst',
        password: 'a-long-first-password',
      })
      .expect(201);
    expect(created.body).toMatchObject({ email: 'nia.new@example.test', role: 'analyst', active: true });

    const agent = await t.anonymous();
    await agent
      .post('/api/auth/sign-in')
      .set('x-csrf-token', agent.csrf)
      .send({ email: 'nia.new@example.test', password: 'a-long-first-password' })
      .expect(200);
  });

  it('rejects a short password with 400 naming the field', async () => {
    const res = await admin
      .post('/api/admin/users')
      .set('x-csrf-token', admin.csrf)
      .send({ email: 'short@example.test', name: 'Short', role: 'exec', password: 'short' })
      .expect(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(res.body.error.message).toBe('Password: Use at least 12 characters.');
  });

  it('answers 409 for an e-mail that already exists', async () => {
    const res = await admin
      .post('/api/admin/users')
      .set('x-csrf-token', admin.csrf)
      .send({
        email: 'otto.ops@demo.ballast.test',
        name: 'Dup',
        role: 'exec',
        password: 'a-long-first-password',
      })
      .expect(409);
    expect(res.body.error.message).toMatch(/already exists/);
  });
});

describe('PATCH /api/admin/users/:id and ownership', () => {
  it('changes a role, records it in the audit log, and the person sees the new role', async () => {
    const users = (await admin.get('/api/admin/users').expect(200)).body as { id: number; email: string }[];
    const exec = users.find((u) => u.email.startsWith('esme.exec'))!;
    const execAgent = await t.signIn('exec');
    await admin
      .patch(`/api/admin/users/${exec.id}`)
      .set('x-csrf-token', admin.csrf)
      .send({ role: 'analyst' })
      .expect(200);
    const me = await execAgent.get('/api/me').expect(200);
    expect(me.body.role).toBe('analyst');
    const audit = await admin.get('/api/admin/audit?action=user.updated').expect(200);
    expect(audit.body.items[0]).toMatchObject({ action: 'user.updated', targetId: String(exec.id) });
  });

  it('refuses to let an admin disable themselves', async () => {
    const me = (await admin.get('/api/me').expect(200)).body as { id: number };
    const res = await admin
      .patch(`/api/admin/users/${me.id}`)
      .set('x-csrf-token', admin.csrf)
      .send({ active: false });
    expect(res.status).toBe(400);
  });

  it('assigns category owners only among category managers', async () => {
    const users = (await admin.get('/api/admin/users').expect(200)).body as { id: number; role: string }[];
    const manager = users.find((u) => u.role === 'manager')!;
    const ops = users.find((u) => u.role === 'ops')!;
    const ok = await admin
      .put('/api/admin/categories/desk-lighting/owners')
      .set('x-csrf-token', admin.csrf)
      .send({ userIds: [manager.id] })
      .expect(200);
    expect(ok.body.owners.map((o: { id: number }) => o.id)).toEqual([manager.id]);
    const bad = await admin
      .put('/api/admin/categories/desk-lighting/owners')
      .set('x-csrf-token', admin.csrf)
      .send({ userIds: [ops.id] })
      .expect(400);
    expect(bad.body.error.message).toMatch(/Only users with the category manager role/);
    const managerAgent = await t.signIn('manager');
    await managerAgent.get('/api/categories/desk-lighting').expect(200);
  });
});
