import { z } from 'zod';
import {
  setSubscriptionSchema,
  subscriptionSchema,
  unsubscribeBodySchema,
  unsubscribeInfoSchema,
  unsubscribeQuerySchema,
  unsubscribeResultSchema,
} from '../../../shared/schemas/digests.schema';
import { AppError } from '../../lib/app-error';
import { access, route } from '../../lib/route';
import {
  listSubscriptions,
  setSubscription,
  unsubscribeInfo,
  unsubscribeWithToken,
} from './subscriptions.service';

export const subscriptionRoutes = [
  route({
    method: 'get',
    path: '/api/me/digests',
    tag: 'subscriptions',
    summary: 'The digests the caller receives or may receive by mail',
    access: access.signedIn,
    response: z.array(subscriptionSchema),
    handler: (req) => listSubscriptions(req.actor!),
  }),
  route({
    method: 'put',
    path: '/api/me/digests',
    tag: 'subscriptions',
    summary: 'Subscribe to or unsubscribe from one digest',
    access: access.signedIn,
    body: setSubscriptionSchema,
    response: z.array(subscriptionSchema),
    handler: (req, _res, { body }) => setSubscription(req.actor!, body, req.ip),
  }),
  route({
    method: 'get',
    path: '/api/unsubscribe',
    tag: 'subscriptions',
    summary: 'What a signed unsubscribe link would turn off (no sign-in; changes nothing)',
    access: access.public,
    sessionless: true,
    query: unsubscribeQuerySchema,
    response: unsubscribeInfoSchema,
    handler: (_req, _res, { query }) => unsubscribeInfo(query.token),
  }),
  route({
    method: 'post',
    path: '/api/unsubscribe',
    tag: 'subscriptions',
    summary: 'Use a signed unsubscribe link (also the one-click List-Unsubscribe-Post target); works once',
    access: access.public,
    sessionless: true,
    body: unsubscribeBodySchema,
    response: unsubscribeResultSchema,
    handler: (req, _res, { body }) => {
      const token = body.token ?? (typeof req.query.token === 'string' ? req.query.token : undefined);
      if (!token) throw new AppError('bad_request', 'This unsubscribe link has no token.', 400);
      return unsubscribeWithToken(token);
    },
  }),
];
