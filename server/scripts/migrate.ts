import { loadConfig } from '../config/env';
import { closeDatabase } from '../db/sequelize';
import { setLogLevel } from '../lib/logger';
import { prepareDatabase } from '../runtime/database';

/** `npm run migrate`: applies pending migrations to DATABASE_URL (or the private database) and exits. */
async function main(): Promise<void> {
  const config = loadConfig();
  setLogLevel('warn');
  const { embedded } = await prepareDatabase(config, (line) => console.log(`[ballast] ${line}`));
  console.log('[ballast] The database schema is up to date.');
  await closeDatabase();
  if (embedded?.startedHere) await embedded.stop();
}

main().catch((err: unknown) => {
  console.error(`[ballast] ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
