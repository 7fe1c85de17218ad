import { Sequelize } from 'sequelize';
import { logger } from '../lib/logger';
import { initModels } from './models';

let current: Sequelize | undefined;

/** A Date as MariaDB DATETIME text in UTC, the zone every column holds. */
export function sqlUtc(date: Date): string {
  return date.toISOString().slice(0, 23).replace('T', ' ');
}

function utcValue(value: unknown): unknown {
  if (value instanceof Date) return sqlUtc(value);
  if (Array.isArray(value)) return value.map(utcValue);
  return value;
}

function utcReplacements(replacements: unknown): unknown {
  if (Array.isArray(replacements)) return replacements.map(utcValue);
  if (replacements && typeof replacements === 'object') {
    return Object.fromEntries(Object.entries(replacements).map(([k, v]) => [k, utcValue(v)]));
  }
  return replacements;
}

export function createSequelize(url: string): Sequelize {
  const sequelize = new Sequelize(url, {
    dialect: 'mariadb',
    logging: (sql) => logger.trace({ sql }, 'sql'),
    define: { underscored: true },
    dialectOptions: { connectTimeout: 5000, permitLocalInfile: true },
    timezone: '+00:00',
    pool: { max: 10, min: 0, acquire: 10_000, idle: 10_000 },
  });
  // Sequelize writes Date replacements of raw queries in the process's local zone, whatever `timezone`
  // says (models and bind parameters honour it), so a server under TZ=Pacific/Auckland moved every
  // cut-off by 13 hours. Every raw query passes through here and gets its Dates in UTC.
  const query = sequelize.query.bind(sequelize) as (
    sql: unknown,
    options?: Record<string, unknown>,
  ) => unknown;
  sequelize.query = ((sql: unknown, options?: Record<string, unknown>) =>
    query(
      sql,
      options?.replacements ? { ...options, replacements: utcReplacements(options.replacements) } : options,
    )) as typeof sequelize.query;
  return sequelize;
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
