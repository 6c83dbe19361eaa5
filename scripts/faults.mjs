// `npm run faults [-- --trials N]`: the server-kill fault test with N kills (default 20) at random
// moments of a running session, on the test set-up of `npm test` (its own MariaDB, maildev, ports).
// `npm test` runs the same test with 3 kills.
import { spawn } from 'node:child_process';

const args = process.argv.slice(2);
const at = args.indexOf('--trials');
const trials = at >= 0 ? Number(args[at + 1]) : 20;
if (!Number.isInteger(trials) || trials < 1) {
  console.error('usage: npm run faults -- [--trials N]   (N ≥ 1, default 20)');
  process.exit(2);
}
const child = spawn(process.execPath, ['scripts/test.mjs', 'tests/integration/server-kills.test.ts'], {
  stdio: 'inherit',
  env: { ...process.env, PARLEY_FAULT_TRIALS: String(trials) },
});
child.on('exit', (code, signal) => process.exit(code ?? (signal ? 1 : 0)));
