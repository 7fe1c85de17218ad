import type { Request, Response } from 'express';
import type { z } from 'zod';
import type { RoleCode } from '../../shared/auth';

/**
 * Who may call a route. `public` needs nothing; `signed-in` any role; a list names the roles.
 * `category` names the route parameter holding a category slug: managers then reach only their own.
 */
export type Access =
  | { kind: 'public' }
  | { kind: 'roles'; roles: readonly RoleCode[] | 'any'; category?: string; tokens?: boolean };

export const access = {
  public: { kind: 'public' } as Access,
  signedIn: { kind: 'roles', roles: 'any' } as Access,
  roles: (roles: readonly RoleCode[], options: { category?: string; tokens?: boolean } = {}): Access => ({
    kind: 'roles',
    roles,
    ...options,
  }),
  category: (param: string, roles: readonly RoleCode[] | 'any' = 'any', tokens = false): Access => ({
    kind: 'roles',
    roles,
    category: param,
    tokens,
  }),
};

type Schema = z.ZodType | undefined;
type Infer<S extends Schema> = S extends z.ZodType ? z.infer<S> : undefined;

export type RouteInput<B extends Schema, Q extends Schema> = { body: Infer<B>; query: Infer<Q> };

export type RouteDef<B extends Schema = Schema, Q extends Schema = Schema> = {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  path: string;
  summary: string;
  tag: string;
  access: Access;
  body?: B;
  /**
   * The JSON body is not read or checked on the event loop: the handler reads it raw (lib/json-body.ts)
   * and a worker thread parses it and checks it against `body`, which stays the one declaration the
   * OpenAPI document publishes. For heavy routes whose bodies run to megabytes.
   */
  bodyInWorker?: boolean;
  query?: Q;
  response?: z.ZodType;
  /** Answered before sessions are read, so it works while the session store (the database) is down. */
  sessionless?: boolean;
  /** Status of a successful answer; 200 unless given. */
  status?: number;
  /** Returns the JSON body, or undefined when it has written the response itself (files, redirects). */
  handler: (req: Request, res: Response, input: RouteInput<B, Q>) => unknown;
};

/** Declares one API route; the registry mounts it behind the guard and publishes it in the OpenAPI document. */
export function route<B extends Schema = undefined, Q extends Schema = undefined>(
  def: RouteDef<B, Q>,
): RouteDef {
  return def as unknown as RouteDef;
}
