import path from 'node:path';
import type { Sequelize } from 'sequelize';
import type { Config } from '../config/env';
import { ensureMariadbInstalled, startEmbeddedMariadb, type EmbeddedMariadb } from '../db/embedded-mariadb';
import { migrateUp } from '../db/migrator';
import { openDatabase } from '../db/sequelize';

export type PreparedDatabase = { sequelize: Sequelize; embedded: EmbeddedMariadb | undefined; url: string };

/**
 * Opens the database Ballast runs on: DATABASE_URL when given, otherwise the private MariaDB in the data
 * directory, started here. Migrations run on every start; they are no-ops once applied.
 */
export async function prepareDatabase(
  config: Config,
  log: (line: string) => void,
): Promise<PreparedDatabase> {
  let embedded: EmbeddedMariadb | undefined;
  let url = config.databaseUrl;
  if (!url) {
    ensureMariadbInstalled(log);
    embedded = await startEmbeddedMariadb({
      dir: path.join(config.dataDir, 'mariadb'),
      port: config.embeddedDbPort,
      database: 'ballast',
      log,
    });
    url = embedded.url;
    log(`MariaDB is running on 127.0.0.1:${embedded.port} (data in ${embedded.dir})`);
  }
  const sequelize = openDatabase(url);
  try {
    await sequelize.authenticate();
  } catch (err) {
    await embedded?.stop();
    const reason = err instanceof Error ? err.message : String(err);
    throw new Error(`Ballast cannot reach its database: ${reason}`, { cause: err });
  }
  const applied = await migrateUp(sequelize);
  if (applied.length > 0) log(`Applied ${applied.length} migration(s).`);
  return { sequelize, embedded, url };
}
