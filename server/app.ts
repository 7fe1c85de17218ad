import { existsSync } from 'node:fs';
import path from 'node:path';
import connectSessionSequelize from 'connect-session-sequelize';
import { csrfSync } from 'csrf-sync';
import express, { type Express, type RequestHandler } from 'express';
import rateLimit from 'express-rate-limit';
import session from 'express-session';
import helmet from 'helmet';
import type { Sequelize } from 'sequelize';
import type { Config } from './config/env';
import './lib/actor';
import { bearerAuth } from './middleware/bearer-auth';
import { errorHandler, notFoundApi } from './middleware/error-handler';
import { configurePassport } from './modules/auth/passport';
import { throttleSessionTouch } from './modules/auth/session-touch';
import { SqlThrottleStore } from './modules/auth/sql-throttle-store';
import { apiRoutes, buildApiRouter } from './modules/registry';
import { configureWorkers } from './workers/pool';

export type AppDeps = { config: Config; sequelize: Sequelize };

const SequelizeStore = connectSessionSequelize(session.Store);

function sessionSecret(config: Config): string {
  if (config.sessionSecret) return config.sessionSecret;
  if (config.env === 'production') throw new Error('SESSION_SECRET must be set in production.');
  return 'ballast-development-session-secret';
}

/** Builds the Express app without listening: the start command and the tests both use it. */
export function createApp({ config, sequelize }: AppDeps): Express {
  const app = express();
  app.disable('x-powered-by');
  configureWorkers(config.heavy);
  if (config.trustProxy) app.set('trust proxy', 1);

  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: true,
        directives: {
          'default-src': ["'self'"],
          'script-src': ["'self'"],
          'style-src': ["'self'", "'unsafe-inline'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          'font-src': ["'self'", 'data:'],
          'connect-src': ["'self'"],
          // The calibration screen's Web Worker is a script of this origin.
          'worker-src': ["'self'"],
          'frame-src': ["'self'"],
          'object-src': ["'none'"],
          'frame-ancestors': ["'self'"],
          'upgrade-insecure-requests': null,
        },
      },
    }),
  );
  app.use(buildApiRouter(apiRoutes.filter((r) => r.sessionless)));

  const store = throttleSessionTouch(
    new SequelizeStore({
      db: sequelize,
      table: 'Session',
      checkExpirationInterval: 15 * 60 * 1000,
      expiration: 12 * 60 * 60 * 1000,
    }),
  );
  app.locals.shutdown = () => store.stopExpiringSessions();
  app.use(
    session({
      name: 'ballast.sid',
      secret: sessionSecret(config),
      store,
      resave: false,
      saveUninitialized: false,
      rolling: true,
      proxy: config.trustProxy,
      cookie: {
        httpOnly: true,
        sameSite: 'lax',
        secure: config.cookieSecure,
        maxAge: 12 * 60 * 60 * 1000,
      },
    }),
  );

  const passport = configurePassport({
    maxAttempts: config.login.maxAttempts,
    lockMinutes: config.login.windowMinutes,
  });
  app.use(passport.initialize());
  app.use(passport.session());
  const attachActor: RequestHandler = (req, _res, next) => {
    if (req.user) req.actor = req.user;
    next();
  };
  app.use(attachActor);
  app.use('/api', bearerAuth);

  const { csrfSynchronisedProtection } = csrfSync({
    getTokenFromRequest: (req) => req.get('x-csrf-token'),
    errorConfig: { statusCode: 403, code: 'EBADCSRFTOKEN', message: 'Invalid CSRF token' },
    // Calls with an API token carry no cookie a forged page could borrow.
    skipCsrfProtection: (req) => (req.get('authorization') ?? '').startsWith('Bearer '),
  });
  app.use('/api', csrfSynchronisedProtection);

  app.use(
    '/api/auth/sign-in',
    rateLimit({
      windowMs: config.login.windowMinutes * 60_000,
      limit: config.login.maxAttempts * 3,
      skipSuccessfulRequests: true,
      store: new SqlThrottleStore(sequelize, 'sign-in'),
      standardHeaders: 'draft-8',
      legacyHeaders: false,
      handler: (_req, res) => {
        res.status(429).json({
          error: {
            code: 'too_many_requests',
            message: `Too many failed sign-ins from this address. Wait ${config.login.windowMinutes} minutes and try again.`,
          },
        });
      },
    }),
  );

  app.use(buildApiRouter(apiRoutes.filter((r) => !r.sessionless)));
  app.use('/api', notFoundApi);

  const clientDir = path.join(config.rootDir, 'dist', 'client');
  if (existsSync(path.join(clientDir, 'index.html'))) {
    app.use(express.static(clientDir, { index: false, maxAge: '1h' }));
    app.get(/^(?!\/api\/).*/, (_req, res) => {
      res.setHeader('Cache-Control', 'no-cache');
      res.sendFile(path.join(clientDir, 'index.html'));
    });
  }

  app.use(errorHandler);
  return app;
}
