import type { RoleCode } from '../../shared/auth';
import { Category, CategoryOwner, User } from '../db/models';
import { db } from '../db/sequelize';
import { demoCategories, generateDemoScenario } from '../demo/scenario';
import { hashPassword } from '../modules/auth/auth.service';
import { importReviewRows } from '../modules/imports/imports.service';
import { backfillSnapshots } from '../modules/snapshots/snapshots.service';

export type DemoAccount = { role: RoleCode; email: string; name: string; password: string };

/** One invented person per role; these accounts exist only in the demo database. */
export const demoAccounts: DemoAccount[] = [
  {
    role: 'admin',
    email: 'ada.admin@demo.ballast.test',
    name: 'Ada Quillfeather',
    password: 'demo-admin-pass',
  },
  { role: 'ops', email: 'otto.ops@demo.ballast.test', name: 'Otto Brambleby', password: 'demo-ops-pass' },
  {
    role: 'manager',
    email: 'mira.manager@demo.ballast.test',
    name: 'Mira Fenwhistle',
    password: 'demo-manager-pass',
  },
  {
    role: 'analyst',
    email: 'anil.analyst@demo.ballast.test',
    name: 'Anil Corrowan',
    password: 'demo-analyst-pass',
  },
  { role: 'exec', email: 'esme.exec@demo.ballast.test', name: 'Esme Halloway', password: 'demo-exec-pass' },
];

/** The demo manager owns two categories, so the others show what "not yours" looks like. */
export const demoManagerCategories = ['kettles-and-brewers', 'portable-power'];

/**
 * Seeds the demo accounts and categories once; later starts find them and leave everything alone. With
 * `reviews` (the start command, demo:reset) the scenario's reviews follow through the import service;
 * tests leave it off and load their own fixed-date data.
 */
export async function seedDemo(
  log: (line: string) => void,
  options: { reviews?: boolean } = {},
): Promise<boolean> {
  if ((await User.count()) > 0) return (await User.count({ where: { email: demoAccounts[0]!.email } })) > 0;
  log('Seeding the demo scenario (first start)...');
  const users = new Map<RoleCode, User>();
  for (const account of demoAccounts) {
    users.set(
      account.role,
      await User.create({
        email: account.email,
        name: account.name,
        role: account.role,
        passwordHash: await hashPassword(account.password),
        lockedUntil: null,
        lastLoginAt: null,
      }),
    );
  }
  for (const category of demoCategories) {
    const row = await Category.create({
      slug: category.slug,
      name: category.name,
      description: category.description,
      settings: category.settings,
    });
    if (demoManagerCategories.includes(category.slug)) {
      await CategoryOwner.create({ categoryId: row.id, userId: users.get('manager')!.id });
    }
  }
  if (options.reviews) {
    await loadDemoReviews(log);
    await backfillDemoHistory(log);
  }
  return true;
}

/**
 * Computes the weekly snapshots of the demo's whole history, so its timelines are full on first start.
 * Categories one after another: each week compares with the week before it.
 */
export async function backfillDemoHistory(log: (line: string) => void): Promise<number> {
  const started = Date.now();
  const categories = await Category.findAll({ order: [['id', 'ASC']] });
  let taken = 0;
  for (const [index, category] of categories.entries()) {
    const outcomes = await backfillSnapshots({ categoryId: category.id });
    taken += outcomes.length;
    log(`Weekly history: ${category.name} (${index + 1} of ${categories.length}), ${outcomes.length} weeks.`);
  }
  log(`Computed ${taken} weekly snapshots in ${((Date.now() - started) / 1000).toFixed(1)} s.`);
  return taken;
}

/**
 * The demo's history ends today at 00:00 UTC (one rule, so a fresh start always shows reviews up to
 * yesterday) and goes in through the import service like any upload.
 */
export function demoAsOf(now: Date = new Date()): Date {
  return new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate()));
}

export async function loadDemoReviews(log: (line: string) => void, asOf = demoAsOf()): Promise<number> {
  const started = Date.now();
  const scenario = generateDemoScenario({ asOf });
  const counts = await importReviewRows(
    scenario.reviews,
    'demo',
    `Demo scenario as of ${asOf.toISOString().slice(0, 10)}`,
  );
  log(`Loaded ${counts.rowsInserted} demo reviews in ${((Date.now() - started) / 1000).toFixed(1)} s.`);
  return counts.rowsInserted;
}

/** Tables a demo reset keeps: the migration log and the role list that a migration seeded. */
const keptOnReset = new Set(['SequelizeMeta', 'roles']);

/**
 * Empties every Ballast table of the (demo) database in one transaction, then seeds the demo again. Only
 * for demo installs: the caller checks that BALLAST_DEMO is on.
 */
export async function resetDemo(log: (line: string) => void): Promise<void> {
  const sequelize = db();
  const [tables] = (await sequelize.query(
    "SELECT table_name AS name FROM information_schema.tables WHERE table_schema = DATABASE() AND table_type = 'BASE TABLE'",
  )) as [{ name: string }[], unknown];
  const wiped = tables.map((t) => t.name).filter((name) => !keptOnReset.has(name));
  await sequelize.transaction(async (transaction) => {
    await sequelize.query('SET FOREIGN_KEY_CHECKS = 0', { transaction });
    for (const name of wiped) await sequelize.query(`DELETE FROM \`${name}\``, { transaction });
    await sequelize.query('SET FOREIGN_KEY_CHECKS = 1', { transaction });
  });
  log(`Emptied ${wiped.length} tables.`);
  await seedDemo(log, { reviews: true });
}
