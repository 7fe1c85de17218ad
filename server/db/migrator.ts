import path from 'node:path';
import { pathToFileURL } from 'node:url';
import type { QueryInterface, Sequelize } from 'sequelize';
import { SequelizeStorage, Umzug, type MigrationFn } from 'umzug';
import { rootDir } from '../config/env';
import { logger } from '../lib/logger';

export type Migration = MigrationFn<QueryInterface>;

type MigrationModule = { up: Migration; down: Migration };

/** The migrations in migrations/, applied in file-name order and recorded in the SequelizeMeta table. */
export function createMigrator(sequelize: Sequelize): Umzug<QueryInterface> {
  return new Umzug<QueryInterface>({
    migrations: {
      glob: ['migrations/*.ts', { cwd: rootDir, ignore: ['**/*.d.ts'] }],
      resolve: ({ name, path: file, context }) => {
        const load = async (): Promise<MigrationModule> =>
          (await import(pathToFileURL(path.resolve(file!)).href)) as MigrationModule;
        return {
          name: name.replace(/\.ts$/, ''),
          up: async () => (await load()).up({ name, path: file, context }),
          down: async () => (await load()).down({ name, path: file, context }),
        };
      },
    },
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize }),
    logger: {
      info: (event) => logger.debug(event, 'migration'),
      warn: (event) => logger.warn(event, 'migration'),
      error: (event) => logger.error(event, 'migration'),
      debug: () => {},
    },
  });
}

export async function migrateUp(sequelize: Sequelize): Promise<string[]> {
  const applied = await createMigrator(sequelize).up();
  return applied.map((m) => m.name);
}
