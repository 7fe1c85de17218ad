import type { Request, Response } from 'express';
import passport from 'passport';
import { meSchema, signInSchema, type Me } from '../../../shared/auth';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { access, route } from '../../lib/route';
import { recordAudit } from '../audit/audit.service';

function authenticateLocal(req: Request, res: Response): Promise<Actor> {
  return new Promise((resolve, reject) => {
    passport.authenticate('local', { session: false }, (err: unknown, user: Actor | false) => {
      if (err) reject(err);
      else if (!user) reject(AppError.unauthenticated('Enter your e-mail and password.'));
      else resolve(user);
    })(req, res);
  });
}

function logIn(req: Request, actor: Actor): Promise<void> {
  // passport 0.7 regenerates the session here, so a session id seen before sign-in is worthless after it.
  return new Promise((resolve, reject) => req.login(actor, (err) => (err ? reject(err) : resolve())));
}

function toMe(actor: Actor): Me {
  return {
    id: actor.id,
    email: actor.email,
    name: actor.name,
    role: actor.role,
    categoryIds: actor.categoryIds ?? [],
  };
}

export const authRoutes = [
  route({
    method: 'get',
    path: '/api/auth/csrf',
    tag: 'auth',
    summary: 'A CSRF token to send as the x-csrf-token header on state-changing requests',
    access: access.public,
    handler: (req) => ({ csrfToken: req.csrfToken?.() }),
  }),
  route({
    method: 'post',
    path: '/api/auth/sign-in',
    tag: 'auth',
    summary: 'Sign in with e-mail and password',
    access: access.public,
    body: signInSchema,
    response: meSchema,
    handler: async (req, res) => {
      const actor = await authenticateLocal(req, res);
      await logIn(req, actor);
      return { ...toMe(actor), csrfToken: req.csrfToken?.(true) };
    },
  }),
  route({
    method: 'post',
    path: '/api/auth/sign-out',
    tag: 'auth',
    summary: 'Sign out and end the session',
    access: access.signedIn,
    status: 204,
    handler: async (req, res) => {
      const actor = req.actor!;
      await new Promise<void>((resolve, reject) => req.logout((err) => (err ? reject(err) : resolve())));
      await new Promise<void>((resolve, reject) =>
        req.session.destroy((err) => (err ? reject(err) : resolve())),
      );
      res.clearCookie('ballast.sid');
      await recordAudit({ actor, action: 'auth.sign_out', ip: req.ip });
      return null;
    },
  }),
  route({
    method: 'get',
    path: '/api/me',
    tag: 'auth',
    summary: 'Who is signed in, with role and owned categories',
    access: access.signedIn,
    response: meSchema,
    handler: (req) => toMe(req.actor!),
  }),
];
