import { Sequelize } from 'sequelize';
import { logger } from '../lib/logger';
import { initModels } from './models';

let current: Sequelize | undefined;

export function createSequelize(url: string): Sequelize {
  return new Sequelize(url, {
    dialect: 'mariadb',
    logging: (sql) => logger.trace({ sql }, 'sql'),
    define: { underscored: true },
    dialectOptions: { connectTimeout: 5000, permitLocalInfile: true },
    timezone: '+00:00',
    pool: { max: 10, min: 0, acquire: 10_000, idle: 10_000 },
  });
}

/** Connects, initialises the models and makes this the connection every service uses. */
export function openDatabase(url: string): Sequelize {
  const sequelize = createSequelize(url);
  initModels(sequelize);
  current = sequelize;
  return sequelize;
}

export function db(): Sequelize {
  if (!current) throw new Error('The database has not been opened yet.');
  return current;
}

export async function closeDatabase(): Promise<void> {
  await current?.close();
  current = undefined;
}
