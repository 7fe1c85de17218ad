import { z } from 'zod';
import { setOwnersSchema } from '../../../shared/admin';
import { categorySummarySchema } from '../../../shared/auth';
import { access, route } from '../../lib/route';
import { getCategory, listCategories, setCategoryOwners } from './categories.service';

export const categoryRoutes = [
  route({
    method: 'get',
    path: '/api/categories',
    tag: 'categories',
    summary: 'Categories the caller may see (a manager sees their own)',
    access: access.signedIn,
    response: z.array(categorySummarySchema),
    handler: (req) => listCategories(req.actor!),
  }),
  route({
    method: 'get',
    path: '/api/categories/:slug',
    tag: 'categories',
    summary: 'One category with its owners',
    access: access.category('slug'),
    response: categorySummarySchema,
    handler: (req) => getCategory(req.category!.slug),
  }),
  route({
    method: 'put',
    path: '/api/admin/categories/:slug/owners',
    tag: 'admin',
    summary: 'Set the category managers who own a category',
    access: access.roles(['admin']),
    body: setOwnersSchema,
    response: categorySummarySchema,
    handler: (req, _res, { body }) =>
      setCategoryOwners(String(req.params.slug), body.userIds, req.actor!, req.ip),
  }),
];
