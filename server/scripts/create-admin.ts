import { createInterface } from 'node:readline/promises';
import { parseArgs } from 'node:util';
import { createUserSchema } from '../../shared/admin';
import { loadConfig } from '../config/env';
import { closeDatabase } from '../db/sequelize';
import { setLogLevel } from '../lib/logger';
import { prepareDatabase } from '../runtime/database';
import { createUser } from '../modules/users/users.service';

/**
 * `npm run create-admin -- --email you@company.example --name "Your Name"`: the first administrator of a
 * real install. The password is read from standard input (typed, or piped), never from the command line.
 */
async function readPassword(): Promise<string> {
  const rl = createInterface({ input: process.stdin, output: process.stdout, terminal: process.stdin.isTTY });
  try {
    return (await rl.question(process.stdin.isTTY ? 'Password (at least 12 characters): ' : '')).trim();
  } finally {
    rl.close();
  }
}

async function main(): Promise<void> {
  const { values } = parseArgs({ options: { email: { type: 'string' }, name: { type: 'string' } } });
  if (!values.email || !values.name) {
    throw new Error('Usage: npm run create-admin -- --email you@company.example --name "Your Name"');
  }
  const config = loadConfig();
  setLogLevel('warn');
  const password = await readPassword();
  const input = createUserSchema.parse({ email: values.email, name: values.name, role: 'admin', password });
  const { embedded } = await prepareDatabase(config, (line) => console.log(`[ballast] ${line}`));
  try {
    const user = await createUser(input, null);
    console.log(`[ballast] Created administrator ${user.email}. Sign in at ${config.publicUrl}`);
  } finally {
    await closeDatabase();
    if (embedded?.startedHere) await embedded.stop();
  }
}

main().catch((err: unknown) => {
  const message =
    err instanceof Error && 'issues' in err
      ? (err as unknown as { issues: { path: string[]; message: string }[] }).issues
          .map((i) => `${i.path.join('.')}: ${i.message}`)
          .join('; ')
      : err instanceof Error
        ? err.message
        : String(err);
  console.error(`[ballast] ${message}`);
  process.exit(1);
});
