import type { RoleCode } from '../../shared/auth';
import { Category, CategoryOwner, User } from '../db/models';
import { demoCategories } from '../demo/scenario';
import { hashPassword } from '../modules/auth/auth.service';

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

/** Seeds the demo accounts and categories once; later starts find them and leave everything alone. */
export async function seedDemo(log: (line: string) => void): Promise<boolean> {
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
  return true;
}
