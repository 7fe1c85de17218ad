import { readFileSync } from 'node:fs';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rootDir } from '../../../server/config/env';
import type { ApiTokenRecord, CreatedToken } from '../../../shared/schemas/tokens.schema';
import { csrfFor, setupTestApp, type Agent, type TestApp } from '../../helpers/test-app';

let t: TestApp;
let admin: Agent;
let second: Agent;
let secondId: number;
let token: CreatedToken;

const secondAdmin = { email: 'ada.second@example.test', password: 'a-second-admin-password' };

beforeAll(async () => {
  t = await setupTestApp();
  admin = await t.signIn('admin');
  const created = await admin
    .post('/api/admin/users')
    .set('x-csrf-token', admin.csrf)
    .send({ ...secondAdmin, name: 'Ada Second', role: 'admin' })
    .expect(201);
  secondId = (created.body as { id: number }).id;
  second = request.agent(t.app) as Agent;
  second.csrf = await csrfFor(second);
  const res = await second
    .post('/api/auth/sign-in')
    .set('x-csrf-token', second.csrf)
    .send(secondAdmin)
    .expect(200);
  second.csrf = (res.body as { csrfToken: string }).csrfToken;
  token = (
    await second
      .post('/api/admin/tokens')
      .set('x-csrf-token', second.csrf)
      .send({ name: 'Nightly upload', role: 'ops' })
      .expect(201)
  ).body as CreatedToken;
});
afterAll(async () => t.close());

const sample = JSON.parse(
  readFileSync(path.join(rootDir, 'templates/score/score-request.sample.json'), 'utf8'),
) as object;
const callWithToken = () =>
  request(t.app).post('/api/score').set('authorization', `Bearer ${token.secret}`).send(sample);

async function setSecondActive(active: boolean): Promise<void> {
  await admin
    .patch(`/api/admin/users/${secondId}`)
    .set('x-csrf-token', admin.csrf)
    .send({ active })
    .expect(200);
}

const reassign = (userId: number) =>
  admin.put(`/api/admin/tokens/${token.token.id}/owner`).set('x-csrf-token', admin.csrf).send({ userId });

describe('tokens of a disabled administrator', () => {
  it('stop while their creator is disabled and work again when the creator is re-enabled', async () => {
    await callWithToken().expect(200);
    await setSecondActive(false);
    const refused = await callWithToken().expect(401);
    expect(refused.body.error.message).toMatch(/person who created it is disabled/);
    await setSecondActive(true);
    await callWithToken().expect(200);
  });

  it('work again once an admin hands them to another active administrator, and only to one', async () => {
    await setSecondActive(false);
    await callWithToken().expect(401);

    const me = (await admin.get('/api/me').expect(200)).body as { id: number };
    const analystId = (
      (await admin.get('/api/admin/users').expect(200)).body as { id: number; role: string }[]
    ).find((u) => u.role === 'analyst')!.id;
    expect((await reassign(analystId).expect(400)).body.error.message).toMatch(/active administrator/);
    await reassign(secondId).expect(400);

    const moved = (await reassign(me.id).expect(200)).body as ApiTokenRecord;
    expect(moved.createdBy).not.toBe('Ada Second');
    expect(moved.createdById).toBe(me.id);
    await callWithToken().expect(200);
  });
});
