import passport from 'passport';
import { Strategy as LocalStrategy } from 'passport-local';
import { signInSchema } from '../../../shared/auth';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { loadActor, verifyCredentials, type LockoutPolicy } from './auth.service';

/** Configures passport: e-mail + password sign-in, and the session holding only the user id. */
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
  passport.serializeUser((user, done) => done(null, (user as Actor).id));
  passport.deserializeUser((id: number, done) => {
    loadActor(id).then(
      (actor) => done(null, actor ?? false),
      (err: unknown) => done(err),
    );
  });
  return passport;
}
