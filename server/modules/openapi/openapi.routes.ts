import { access, route } from '../../lib/route';
import { buildOpenApi } from './openapi.service';

export const openapiRoutes = [
  route({
    method: 'get',
    path: '/api/openapi.json',
    tag: 'meta',
    summary: 'This OpenAPI document',
    access: access.public,
    handler: async (req) => {
      // Imported lazily: the registry imports this module, so a static import would be a cycle.
      const { apiRoutes } = await import('../registry');
      return buildOpenApi(apiRoutes, `${req.protocol}://${req.get('host') ?? 'localhost'}`);
    },
  }),
];
