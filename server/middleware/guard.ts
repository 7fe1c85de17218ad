import type { RequestHandler } from 'express';
import { AppError } from '../lib/app-error';
import type { Access } from '../lib/route';
import type { Actor } from '../lib/actor';
import { findCategoryBySlug, type CategoryRef } from '../modules/categories/categories.service';

/** Which categories an actor may read: the one rule, for route parameters and request bodies alike. */
export async function categoryForActor(actor: Actor, slug: unknown): Promise<CategoryRef> {
  const category = typeof slug === 'string' ? await findCategoryBySlug(slug) : null;
  if (!category) throw AppError.notFound('The category');
  if (actor.categoryIds && !actor.categoryIds.includes(category.id)) {
    throw AppError.forbidden('This category is not one of yours.');
  }
  return category;
}

/** The one check every API route passes through: who is calling, with which role, on which category. */
export function guard(access: Access): RequestHandler {
  return async (req, _res, next) => {
    if (access.kind === 'public') return next();
    const actor = req.actor;
    if (!actor) {
      throw AppError.unauthenticated('You are not signed in, or your session has ended. Please sign in.');
    }
    if (actor.kind === 'token' && !access.tokens) {
      throw AppError.forbidden('API tokens cannot use this endpoint; sign in to the web app instead.');
    }
    if (access.roles !== 'any' && !access.roles.includes(actor.role)) {
      throw AppError.forbidden('Your role does not allow this.');
    }
    if (access.category) {
      req.category = await categoryForActor(actor, req.params[access.category]);
    }
    next();
  };
}
