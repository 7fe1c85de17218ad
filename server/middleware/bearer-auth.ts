import type { RequestHandler } from 'express';
import { authenticateToken } from '../modules/tokens/tokens.service';

/** `Authorization: Bearer <token>` makes the token the caller, in place of any session. */
export const bearerAuth: RequestHandler = async (req, _res, next) => {
  const header = req.get('authorization');
  if (!header || !/^bearer\s/i.test(header)) return next();
  req.actor = await authenticateToken(header.replace(/^bearer\s+/i, '').trim());
  next();
};
