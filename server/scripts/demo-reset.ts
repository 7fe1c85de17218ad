import { createInterface } from 'node:readline/promises';
import { loadConfig } from '../config/env';
import { closeDatabase } from '../db/sequelize';
import { setLogLevel } from '../lib/logger';
import { prepareDatabase } from '../runtime/database';
import { demoAccounts, resetDemo } from '../runtime/seed';

/**
 * `npm run demo:reset [-- --yes]`: throws away everything in the configured database (people, categories,
 * items, reviews, imports, tokens, snapshots...) and loads the invented demo scenario again. Refused unless
 * the install is a demo (BALLAST_DEMO on, the default only with the private database).
 */
const say = (line: string): void => console.log(`[ballast] ${line}`);

async function confirmed(target: string): Promise<boolean> {
  if (process.argv.includes('--yes')) return true;
  if (!process.stdin.isTTY) {
    say('Not resetting: add --yes to confirm when not running in a terminal.');
    return false;
  }
  const rl = createInterface({ input: process.stdin, output: process.stdout });
  try {
    const answer = await rl.question(
      `This deletes ALL data in ${target} and loads the demo scenario again. Type "reset" to continue: `,
    );
    return answer.trim() === 'reset';
  } finally {
    rl.close();
  }
}

async function main(): Promise<void> {
  const config = loadConfig();
  setLogLevel('warn');
  if (!config.demo)
    throw new Error(
      'This is not a demo install (BALLAST_DEMO is off), so demo:reset refuses to delete its data. ' +
        'Set BALLAST_DEMO=true only for a database that holds nothing but the demo.',
    );
  const target = config.databaseUrl
    ? `the database ${new URL(config.databaseUrl).pathname.slice(1)} on ${new URL(config.databaseUrl).host}`
    : `the private database in ${config.dataDir}`;
  if (!(await confirmed(target))) {
    say('Nothing was changed.');
    return;
  }
  const started = Date.now();
  const { embedded } = await prepareDatabase(config, say);
  try {
    await resetDemo(say);
    say(`Demo data rebuilt in ${((Date.now() - started) / 1000).toFixed(1)} s. Demo sign-ins:`);
    for (const account of demoAccounts)
      say(`  ${account.role.padEnd(8)} ${account.email}  ${account.password}`);
  } finally {
    await closeDatabase();
    if (embedded?.startedHere) await embedded.stop();
  }
}

main().catch((err: unknown) => {
  console.error(`[ballast] ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
