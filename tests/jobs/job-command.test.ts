import { spawn } from 'node:child_process';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rootDir } from '../../server/config/env';
import { Category, JobRun, Snapshot } from '../../server/db/models';
import { seedDemo } from '../../server/runtime/seed';
import { loadDemoForTests } from '../helpers/demo-data';
import { createTestDatabase, type TestDatabase } from '../helpers/test-db';

let db: TestDatabase;

beforeAll(async () => {
  db = await createTestDatabase();
  await seedDemo(() => {});
  await loadDemoForTests();
});
afterAll(async () => db.drop());

function job(args: string[]): Promise<{ code: number | null; out: string }> {
  return new Promise((resolve) => {
    let out = '';
    const child = spawn(
      process.execPath,
      ['--import', 'tsx', path.join(rootDir, 'server/scripts/job.ts'), ...args],
      {
        cwd: rootDir,
        env: { ...process.env, NODE_ENV: 'test', DATABASE_URL: db.url, LOG_LEVEL: 'silent' },
        stdio: ['ignore', 'pipe', 'pipe'],
      },
    );
    child.stdout.on('data', (d: Buffer) => (out += d.toString()));
    child.stderr.on('data', (d: Buffer) => (out += d.toString()));
    child.on('exit', (code) => resolve({ code, out }));
  });
}

describe('npm run job', () => {
  it('takes one week’s snapshot by hand, records the run, keeps it on a rerun without --replace and replaces it with', async () => {
    const category = (await Category.findOne({ where: { slug: 'trail-packs' } }))!;
    const first = await job(['snapshot', '--category', 'trail-packs', '--week', '2026-W40']);
    expect(first.out).toMatch(/Took snapshot \d+ of 2026-W40: \d+ rows\./);
    expect(first.code).toBe(0);
    expect(await Snapshot.count({ where: { categoryId: category.id, isoWeek: '2026-W40' } })).toBe(1);
    const run = await JobRun.findOne({ where: { categoryId: category.id, isoWeek: '2026-W40' } });
    expect(run).toMatchObject({ trigger: 'manual', status: 'succeeded', createdBy: 'command line' });

    const kept = await job(['snapshot', '--category', 'trail-packs', '--week', '2026-W40']);
    expect(kept.code).toBe(0);
    expect(kept.out).toContain('Trail Packs already has a snapshot for 2026-W40.');
    expect(kept.out).toContain('Kept the existing snapshot.');
    expect(await Snapshot.count({ where: { categoryId: category.id, isoWeek: '2026-W40' } })).toBe(1);

    const replaced = await job(['snapshot', '--category', 'trail-packs', '--week', '2026-W40', '--replace']);
    expect(replaced.code).toBe(0);
    expect(replaced.out).toMatch(/Replaced snapshot \d+ of 2026-W40/);
  });

  it('backfills a range of weeks with progress', async () => {
    const category = (await Category.findOne({ where: { slug: 'garden-tools' } }))!;
    const res = await job([
      'backfill',
      '--category',
      'garden-tools',
      '--from',
      '2026-W30',
      '--to',
      '2026-W33',
    ]);
    expect(res.code).toBe(0);
    expect(res.out).toContain('Progress: 4 of 4.');
    const weeks = await Snapshot.findAll({ where: { categoryId: category.id }, attributes: ['isoWeek'] });
    expect(
      weeks
        .map((w) => w.isoWeek)
        .filter((w) => w >= '2026-W30' && w <= '2026-W33')
        .sort(),
    ).toEqual(['2026-W30', '2026-W31', '2026-W32', '2026-W33']);
  });

  it('explains its usage and exits 2 for a week that is not an ISO week', async () => {
    const res = await job(['snapshot', '--category', 'trail-packs', '--week', '2026-48']);
    expect(res.code).toBe(2);
    expect(res.out).toContain('"2026-48" is not an ISO week such as 2026-W48.');
  });
});
