import path from 'node:path';
import { loadConfig } from '../config/env';
import {
  clusterStatus,
  defaultLayout,
  nodesOf,
  nodeUrl,
  startCluster,
  stopCluster,
} from '../db/galera-cluster';
import { clusterNeeds, ensureSystemPackages } from './system-packages';

/**
 * `npm run cluster -- start|stop|status`: a three-node MariaDB Galera cluster on loopback under
 * `.data/cluster/` (SQL ports 3411–3413, Galera 4567/4577/4587). Point each Ballast server at a node with
 * its DATABASE_URL, printed by `start` and `status`.
 */
const say = (line: string): void => console.log(`[ballast cluster] ${line}`);

async function main(): Promise<number> {
  const command = process.argv[2] ?? 'status';
  const layout = defaultLayout(path.join(loadConfig().dataDir, 'cluster'));
  if (command === 'start') {
    ensureSystemPackages(clusterNeeds, say);
    const started = Date.now();
    await startCluster(layout, say);
    say(`Three nodes are Synced in a cluster of 3 (${((Date.now() - started) / 1000).toFixed(1)} s).`);
  } else if (command === 'stop') {
    await stopCluster(layout);
    say('Stopped every node (node 1 last: it founds the cluster on the next start).');
    return 0;
  } else if (command !== 'status') {
    say(`Unknown command "${command}": use start, stop or status.`);
    return 2;
  }
  const states = await clusterStatus(layout);
  const nodes = nodesOf(layout);
  for (const s of states) {
    const where = s.running
      ? `pid ${s.pid}, ${s.state ?? '?'}, cluster size ${s.clusterSize ?? '?'}`
      : 'stopped';
    say(`node ${s.n}: port ${s.port}, ${where}`);
    if (s.running) say(`  DATABASE_URL=${nodeUrl(layout, nodes[s.n - 1]!)}`);
  }
  return 0;
}

main().then(
  (code) => process.exit(code),
  (err: unknown) => {
    console.error(`[ballast cluster] ${err instanceof Error ? err.message : String(err)}`);
    process.exit(1);
  },
);
