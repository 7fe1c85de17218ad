import { z } from 'zod';
import {
  auditEntrySchema,
  auditQuerySchema,
  createUserSchema,
  updateUserSchema,
  userSchema,
} from '../../../shared/admin';
import { AppError } from '../../lib/app-error';
import { access, route } from '../../lib/route';
import { listAudit } from '../audit/audit.service';
import { createUser, listUsers, updateUser } from './users.service';

const admin = access.roles(['admin']);

function userId(raw: unknown): number {
  const id = Number(raw);
  if (!Number.isInteger(id) || id <= 0) throw AppError.notFound('The user');
  return id;
}

export const userRoutes = [
  route({
    method: 'get',
    path: '/api/admin/users',
    tag: 'admin',
    summary: 'Every user with role, state and owned categories',
    access: admin,
    response: z.array(userSchema),
    handler: () => listUsers(),
  }),
  route({
    method: 'post',
    path: '/api/admin/users',
    tag: 'admin',
    summary: 'Create a user',
    access: admin,
    body: createUserSchema,
    response: userSchema,
    status: 201,
    handler: (req, _res, { body }) => createUser(body, req.actor!, req.ip),
  }),
  route({
    method: 'patch',
    path: '/api/admin/users/:id',
    tag: 'admin',
    summary: 'Change a user: name, role, active, password, or unlock',
    access: admin,
    body: updateUserSchema,
    response: userSchema,
    handler: (req, _res, { body }) => updateUser(userId(req.params.id), body, req.actor!, req.ip),
  }),
  route({
    method: 'get',
    path: '/api/admin/audit',
    tag: 'admin',
    summary: 'The audit log, newest first',
    access: admin,
    query: auditQuerySchema,
    response: z.object({ items: z.array(auditEntrySchema), total: z.number().int() }),
    handler: (_req, _res, { query }) => listAudit(query),
  }),
];
