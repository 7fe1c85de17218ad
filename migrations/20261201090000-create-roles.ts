import { DataTypes } from 'sequelize';
import type { Migration } from '../server/db/migrator';

const roles = [
  ['admin', 'Administrator', 'Manages users, roles, category ownership and API tokens; reads the audit log.'],
  [
    'ops',
    'Operations',
    'Sets report schedules and recipients, runs jobs, watches job history and deliveries.',
  ],
  [
    'manager',
    'Category manager',
    'Owns categories: reads their digests, sets their scoring settings, flags items.',
  ],
  [
    'analyst',
    'Analyst',
    'Explores any category: drift timelines, what-if previews, calibration, CSV exports.',
  ],
  ['exec', 'Executive', 'Reads the portfolio across categories and downloads digest PDFs.'],
];

export const up: Migration = async ({ context: qi }) => {
  await qi.createTable('roles', {
    code: { type: DataTypes.STRING(20), primaryKey: true },
    label: { type: DataTypes.STRING(60), allowNull: false },
    description: { type: DataTypes.STRING(255), allowNull: false },
  });
  await qi.bulkInsert(
    'roles',
    roles.map(([code, label, description]) => ({ code, label, description })),
  );
};

export const down: Migration = async ({ context: qi }) => {
  await qi.dropTable('roles');
};
