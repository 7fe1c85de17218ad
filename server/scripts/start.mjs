/* global process, setInterval, clearInterval */
// `npm start` runs this plain-Node launcher. npm does not reliably pass SIGINT/SIGTERM on to its script,
// so the launcher forwards them to the server, and also stops the server when npm itself goes away.
import { spawn } from 'node:child_process';
import path from 'node:path';
import { fileURLToPath } from 'node:url';

const rootDir = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
const server = spawn(
  process.execPath,
  ['--import', 'tsx', path.join(rootDir, 'server/index.ts'), ...process.argv.slice(2)],
  { cwd: process.cwd(), stdio: 'inherit' },
);

let forwarded = false;
const forward = (signal) => {
  if (forwarded || server.exitCode !== null) return;
  forwarded = true;
  server.kill(signal);
};
process.on('SIGINT', () => forward('SIGINT'));
process.on('SIGTERM', () => forward('SIGTERM'));
process.on('SIGHUP', () => forward('SIGTERM'));

// When npm exits on a signal without passing it on, this process is re-parented: stop the server then.
const parent = process.ppid;
const watch = setInterval(() => {
  if (process.ppid !== parent) forward('SIGTERM');
}, 250);

server.on('exit', (code, signal) => {
  clearInterval(watch);
  process.exit(code ?? (signal ? 1 : 0));
});
