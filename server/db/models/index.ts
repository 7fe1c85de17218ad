import type { Sequelize } from 'sequelize';
import { AuditEvent } from './audit-event.model';
import { CategoryOwner } from './category-owner.model';
import { Category } from './category.model';
import { Role } from './role.model';
import { Session } from './session.model';
import { User } from './user.model';

/** Initialises every model on one connection and declares the associations in one place. */
export function initModels(sequelize: Sequelize): void {
  for (const model of [Role, User, Category, CategoryOwner, Session, AuditEvent]) model.initModel(sequelize);

  User.belongsTo(Role, { foreignKey: 'role', targetKey: 'code', as: 'roleInfo' });
  Category.belongsToMany(User, {
    through: CategoryOwner,
    foreignKey: 'categoryId',
    otherKey: 'userId',
    as: 'owners',
  });
  User.belongsToMany(Category, {
    through: CategoryOwner,
    foreignKey: 'userId',
    otherKey: 'categoryId',
    as: 'ownedCategories',
  });
  AuditEvent.belongsTo(User, { foreignKey: 'actorUserId', as: 'actor', constraints: false });
}

export { AuditEvent, Category, CategoryOwner, Role, Session, User };
