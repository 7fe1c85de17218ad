import { pathToFileURL } from 'node:url';
import path from 'node:path';
import { rootDir } from '../config/env';

/**
 * `npm run drill -- NAME`: runs `server/drills/NAME.drill.ts`, which prints PASS or FAIL per check and
 * exits non-zero when any check fails.
 */
async function main(): Promise<number> {
  const name = process.argv[2];
  if (!name || !/^[a-z-]+$/.test(name)) {
    console.error('[ballast drill] Name a drill: npm run drill -- cluster');
    return 2;
  }
  const drill = (await import(
    pathToFileURL(path.join(rootDir, 'server', 'drills', `${name}.drill.ts`)).href
  )) as {
    run: () => Promise<boolean>;
  };
  return (await drill.run()) ? 0 : 1;
}

main().then(
  (code) => process.exit(code),
  (err: unknown) => {
    console.error(`[ballast drill] ${err instanceof Error ? (err.stack ?? err.message) : String(err)}`);
    process.exit(1);
  },
);
