import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { signInSchema } from '../../../shared/auth';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import {
  loadSessionActor,
  sessionUserFor,
  verifyCredentials,
  type LockoutPolicy,
  type SessionUser,
} from './auth.service';

/** Configures passport: e-mail + password sign-in, and the session holding the user id and credential version. */
export function configurePassport(policy: LockoutPolicy): passport.PassportStatic {
  passport.use(
    new LocalStrategy({ usernameField: 'email', passReqToCallback: true }, (req, email, password, done) => {
      const parsed = signInSchema.safeParse({ email, password });
      if (!parsed.success) {
        done(AppError.unauthenticated('That e-mail and password do not match an account.'));
        return;
      }
      verifyCredentials(parsed.data.email, parsed.data.password, policy, req.ip).then(
        (actor) => done(null, actor),
        (err: unknown) => done(err),
      );
    }),
  );
  passport.serializeUser((user, done) => {
    sessionUserFor((user as Actor).id).then(
      (stored) => done(null, stored),
      (err: unknown) => done(err),
    );
  });
  passport.deserializeUser((stored: SessionUser | number, done) => {
    loadSessionActor(stored).then(
      (actor) => done(null, actor ?? false),
      (err: unknown) => done(err),
    );
  });
  return passport;
}
