import { randomBytes } from 'node:crypto';
import { QueryTypes, type Sequelize } from 'sequelize';
import { inject } from 'vitest';
import { migrateUp } from '../../server/db/migrator';
import { closeDatabase, db, openDatabase } from '../../server/db/sequelize';

export type TestDatabase = { url: string; name: string; sequelize: Sequelize; drop: () => Promise<void> };

/** A freshly migrated database of its own for one test file, on the run's throw-away server. */
export async function createTestDatabase(): Promise<TestDatabase> {
  const server = new URL(inject('dbServerUrl'));
  const name = `ballast_t_${randomBytes(5).toString('hex')}`;
  const admin = openDatabase(server.toString());
  await admin.query(`CREATE DATABASE \`${name}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`);
  await closeDatabase();
  const url = new URL(server);
  url.pathname = `/${name}`;
  const sequelize = openDatabase(url.toString());
  await migrateUp(sequelize);
  return {
    url: url.toString(),
    name,
    sequelize,
    drop: async () => {
      // The current connection, which a test may have replaced to simulate an outage.
      await db().query(`DROP DATABASE IF EXISTS \`${name}\``);
      await closeDatabase();
    },
  };
}

/** Every table of the open test database except the session store, which each request may touch. */
export async function tablesExceptSessions(): Promise<string[]> {
  const rows = (await db().query('SHOW TABLES', { type: QueryTypes.SELECT })) as Record<string, string>[];
  return rows.map((r) => Object.values(r)[0]!).filter((name) => name !== 'sessions');
}
