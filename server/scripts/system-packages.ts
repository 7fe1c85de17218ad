import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';

export type SystemNeed = { what: string; check: string[]; debianPackage: string };

/** Programs from Debian that Ballast's tests use: the database, the browser and the PDF renderer. */
export const testNeeds: SystemNeed[] = [
  {
    what: 'MariaDB server',
    check: ['/usr/sbin/mariadbd', '/usr/bin/mariadbd'],
    debianPackage: 'mariadb-server',
  },
  { what: 'Chromium', check: ['/usr/bin/chromium'], debianPackage: 'chromium' },
  { what: 'pdftoppm (poppler-utils)', check: ['/usr/bin/pdftoppm'], debianPackage: 'poppler-utils' },
];

/** The Galera cluster (`npm run cluster`, `npm run drill -- cluster`): the provider and its state transfer. */
export const clusterNeeds: SystemNeed[] = [
  testNeeds[0]!,
  {
    what: 'Galera 4 (wsrep provider)',
    check: ['/usr/lib/galera/libgalera_smm.so'],
    debianPackage: 'galera-4',
  },
  { what: 'rsync (Galera state transfer)', check: ['/usr/bin/rsync'], debianPackage: 'rsync' },
];

export function missingNeeds(needs: SystemNeed[]): SystemNeed[] {
  return needs.filter((need) => !need.check.some((p) => existsSync(p)));
}

/** Installs what is missing when running as root; otherwise stops with the exact command to run. */
export function ensureSystemPackages(needs: SystemNeed[], log: (line: string) => void): void {
  const missing = missingNeeds(needs);
  if (missing.length === 0) return;
  const packages = missing.map((m) => m.debianPackage).join(' ');
  const command = `apt-get update && DEBIAN_FRONTEND=noninteractive apt-get install -y ${packages}`;
  const isRoot = typeof process.getuid === 'function' && process.getuid() === 0;
  if (!isRoot) {
    throw new Error(
      `Missing ${missing.map((m) => m.what).join(', ')}. Run this once as root, then try again:\n  sudo sh -c '${command}'`,
    );
  }
  log(`Installing ${missing.map((m) => m.what).join(', ')} from Debian packages: ${packages}`);
  const result = spawnSync('sh', ['-c', command], { stdio: 'inherit' });
  if (result.status !== 0 || missingNeeds(needs).length > 0) {
    throw new Error(`Installing ${packages} failed. Try by hand:\n  ${command}`);
  }
}
