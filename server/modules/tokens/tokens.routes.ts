import { z } from 'zod';
import {
  apiTokenSchema,
  createdTokenSchema,
  createTokenSchema,
  reassignTokenSchema,
} from '../../../shared/schemas/tokens.schema';
import { AppError } from '../../lib/app-error';
import { access, route } from '../../lib/route';
import { createToken, listTokens, reassignToken, revokeToken } from './tokens.service';

const admin = access.roles(['admin']);

function tokenId(raw: unknown): number {
  const id = Number(raw);
  if (!Number.isInteger(id) || id <= 0) throw AppError.notFound('The token');
  return id;
}

export const tokenRoutes = [
  route({
    method: 'get',
    path: '/api/admin/tokens',
    tag: 'admin',
    summary: 'API tokens, without their secrets',
    access: admin,
    response: z.array(apiTokenSchema),
    handler: () => listTokens(),
  }),
  route({
    method: 'post',
    path: '/api/admin/tokens',
    tag: 'admin',
    summary: 'Create an API token; the secret is in this answer only',
    access: admin,
    body: createTokenSchema,
    response: createdTokenSchema,
    status: 201,
    handler: (req, _res, { body }) => createToken(body, req.actor!, req.ip),
  }),
  route({
    method: 'delete',
    path: '/api/admin/tokens/:id',
    tag: 'admin',
    summary: 'Revoke an API token; calls with it are refused from then on',
    access: admin,
    response: apiTokenSchema,
    handler: (req) => revokeToken(tokenId(req.params.id), req.actor!, req.ip),
  }),
  route({
    method: 'put',
    path: '/api/admin/tokens/:id/owner',
    tag: 'admin',
    summary: 'Hand an API token to another active administrator',
    access: admin,
    body: reassignTokenSchema,
    response: apiTokenSchema,
    handler: (req, _res, { body }) => reassignToken(tokenId(req.params.id), body, req.actor!, req.ip),
  }),
];
