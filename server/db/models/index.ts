import type { Sequelize } from 'sequelize';
import { AggregateObservation } from './aggregate-observation.model';
import { ApiToken } from './api-token.model';
import { AuditEvent } from './audit-event.model';
import { CalibrationNote } from './calibration-note.model';
import { CategoryOwner } from './category-owner.model';
import { Category } from './category.model';
import { DigestSubscription } from './digest-subscription.model';
import { Digest } from './digest.model';
import { ImportBatch } from './import-batch.model';
import { ImportRowError } from './import-row-error.model';
import { Item } from './item.model';
import { JobRun } from './job-run.model';
import { MailDelivery } from './mail-delivery.model';
import { OutboxMessage } from './outbox-message.model';
import { ReportSchedule } from './report-schedule.model';
import { Review } from './review.model';
import { Role } from './role.model';
import { Session } from './session.model';
import { SnapshotRow } from './snapshot-row.model';
import { Snapshot } from './snapshot.model';
import { User } from './user.model';
import { WebhookDelivery } from './webhook-delivery.model';
import { Webhook } from './webhook.model';

/** Initialises every model on one connection and declares the associations in one place. */
export function initModels(sequelize: Sequelize): void {
  const models = [
    Role,
    User,
    Category,
    CategoryOwner,
    Session,
    AuditEvent,
    Item,
    Review,
    AggregateObservation,
    ImportBatch,
    ImportRowError,
    ApiToken,
    Snapshot,
    SnapshotRow,
    ReportSchedule,
    JobRun,
    CalibrationNote,
    Digest,
    DigestSubscription,
    MailDelivery,
    OutboxMessage,
    Webhook,
    WebhookDelivery,
  ];
  for (const model of models) model.initModel(sequelize);

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
  Category.hasMany(Item, { foreignKey: 'categoryId', as: 'items' });
  Item.belongsTo(Category, { foreignKey: 'categoryId', as: 'category' });
  Item.hasMany(Review, { foreignKey: 'itemId', as: 'reviews' });
  Review.belongsTo(Item, { foreignKey: 'itemId', as: 'item' });
  Item.hasMany(AggregateObservation, { foreignKey: 'itemId', as: 'observations' });
  AggregateObservation.belongsTo(Item, { foreignKey: 'itemId', as: 'item' });
  ImportBatch.hasMany(ImportRowError, { foreignKey: 'batchId', as: 'rowErrors' });
  ImportBatch.belongsTo(User, { foreignKey: 'userId', as: 'user', constraints: false });
  JobRun.belongsTo(ReportSchedule, { foreignKey: 'scheduleId', as: 'schedule', constraints: false });
  JobRun.belongsTo(Category, { foreignKey: 'categoryId', as: 'category', constraints: false });
  Snapshot.belongsTo(Category, { foreignKey: 'categoryId', as: 'category' });
  Snapshot.hasMany(SnapshotRow, { foreignKey: 'snapshotId', as: 'rows' });
  SnapshotRow.belongsTo(Snapshot, { foreignKey: 'snapshotId', as: 'snapshot' });
  SnapshotRow.belongsTo(Item, { foreignKey: 'itemId', as: 'item' });
  MailDelivery.belongsTo(Digest, { foreignKey: 'digestId', as: 'digest' });
  Digest.hasMany(MailDelivery, { foreignKey: 'digestId', as: 'deliveries' });
}

export {
  AggregateObservation,
  ApiToken,
  AuditEvent,
  CalibrationNote,
  Category,
  CategoryOwner,
  Digest,
  DigestSubscription,
  ImportBatch,
  ImportRowError,
  Item,
  JobRun,
  MailDelivery,
  OutboxMessage,
  ReportSchedule,
  Review,
  Role,
  Session,
  Snapshot,
  SnapshotRow,
  User,
  Webhook,
  WebhookDelivery,
};
