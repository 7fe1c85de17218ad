import type { RoleCode } from '../../shared/auth';

/** Who is calling: a signed-in person or an API token, with what the guard needs to decide. */
export type Actor = {
  kind: 'user' | 'token';
  id: number;
  email: string;
  name: string;
  role: RoleCode;
  /** Categories a manager owns (or a token is limited to); null means every category. */
  categoryIds: number[] | null;
};

declare module 'express-serve-static-core' {
  interface Request {
    actor?: Actor;
    /** Set by the guard when a route is scoped to a category. */
    category?: { id: number; slug: string; name: string };
  }
}

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends Actor {}
  }
}
