import type { CategorySummary } from '../../../shared/auth';
import { keyOf } from '../../../shared/keys';
import { Category, CategoryOwner, User } from '../../db/models';
import type { Actor } from '../../lib/actor';
import { AppError } from '../../lib/app-error';
import { recordAudit } from '../audit/audit.service';

export type CategoryRef = { id: number; slug: string; name: string };

export async function findCategoryBySlug(slug: string): Promise<CategoryRef | null> {
  const row = await Category.findOne({ where: { slug: keyOf(slug) }, attributes: ['id', 'slug', 'name'] });
  return row ? { id: row.id, slug: row.slug, name: row.name } : null;
}

function toSummary(row: Category & { owners?: User[] }): CategorySummary {
  return {
    id: row.id,
    slug: row.slug,
    name: row.name,
    description: row.description,
    owners: (row.owners ?? []).map((u) => ({ id: u.id, name: u.name, email: u.email })),
  };
}

/** The categories this caller may see: every one, or a manager's own. */
export async function listCategories(actor: Actor): Promise<CategorySummary[]> {
  const rows = await Category.findAll({
    where: actor.categoryIds ? { id: actor.categoryIds } : {},
    include: [
      { model: User, as: 'owners', attributes: ['id', 'name', 'email'], through: { attributes: [] } },
    ],
    order: [['name', 'ASC']],
  });
  return rows.map(toSummary);
}

export async function getCategory(slug: string): Promise<CategorySummary> {
  const row = await Category.findOne({
    where: { slug: keyOf(slug) },
    include: [
      { model: User, as: 'owners', attributes: ['id', 'name', 'email'], through: { attributes: [] } },
    ],
  });
  if (!row) throw AppError.notFound('The category');
  return toSummary(row);
}

export async function setCategoryOwners(
  slug: string,
  userIds: number[],
  actor: Actor,
  ip?: string,
): Promise<CategorySummary> {
  const category = await Category.findOne({ where: { slug: keyOf(slug) } });
  if (!category) throw AppError.notFound('The category');
  const users = await User.findAll({ where: { id: userIds }, attributes: ['id', 'role'] });
  if (users.length !== new Set(userIds).size)
    throw new AppError('bad_request', 'Some of those users do not exist.', 400);
  const notManagers = users.filter((u) => u.role !== 'manager');
  if (notManagers.length > 0) {
    throw new AppError('bad_request', 'Only users with the category manager role can own a category.', 400);
  }
  await Category.sequelize!.transaction(async (transaction) => {
    await CategoryOwner.destroy({ where: { categoryId: category.id }, transaction });
    await CategoryOwner.bulkCreate(
      users.map((u) => ({ categoryId: category.id, userId: u.id })),
      { transaction },
    );
  });
  await recordAudit({
    actor,
    action: 'category.owners_set',
    targetType: 'category',
    targetId: slug,
    details: { userIds },
    ip,
  });
  return getCategory(slug);
}
