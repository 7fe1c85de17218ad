import { readdirSync } from 'node:fs';
import path from 'node:path';
import { pathToFileURL } from 'node:url';
import { rootDir } from '../config/env';

/**
 * `npm run bench [-- name ...]`: runs every `server/bench/<name>.bench.ts` (or the named ones) in turn.
 * Each bench prints its own figures as ratios against a baseline measured in the same run.
 */
async function main(): Promise<void> {
  const dir = path.join(rootDir, 'server', 'bench');
  const wanted = process.argv.slice(2).filter((a) => !a.startsWith('-'));
  const names = readdirSync(dir)
    .filter((f) => f.endsWith('.bench.ts'))
    .map((f) => f.replace(/\.bench\.ts$/, ''))
    .filter((name) => wanted.length === 0 || wanted.includes(name))
    .sort();
  if (names.length === 0) throw new Error(`No bench called ${wanted.join(', ')} in server/bench.`);
  for (const name of names) {
    console.log(`\n=== ${name} ===`);
    const started = performance.now();
    const bench = (await import(pathToFileURL(path.join(dir, `${name}.bench.ts`)).href)) as {
      run: () => Promise<void>;
    };
    await bench.run();
    console.log(`(${name} took ${((performance.now() - started) / 1000).toFixed(1)} s)`);
  }
}

main().catch((err: unknown) => {
  console.error(`[ballast bench] ${err instanceof Error ? err.message : String(err)}`);
  process.exit(1);
});
