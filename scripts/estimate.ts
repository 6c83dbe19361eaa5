/**
 * SFEM from a choice-panel CSV (Parley's export, or any panel through --map).
 *   npx tsx scripts/estimate.ts -- --file panel.csv [--map field=column …] [--by treatment|session|none]
 *     [--window all|after-rounds:R|last:N|supergames:A-B] [--strategies ALLD,ALLC,…]
 *     [--bootstrap B --seed S] [--starts N] [--json]
 * Parsing, validation and estimation live in app/lib (the app's upload runs the same code);
 * this file only reads the file, runs the bootstrap on worker threads and prints.
 */
import { readFileSync } from 'node:fs';
import { parseArgs } from 'node:util';
import { estimateFromCsv } from '#app/lib/panel-csv';
import type { GroupBy } from '#app/lib/panel';
import type { BootstrapSummary } from '#app/lib/sfem';
import { bootstrapOnWorkers } from '#app/lib/sfem-workers.server';

const USAGE = `Strategy-frequency estimation (SFEM) on a choice-panel CSV.

Usage: npm run -s estimate -- --file panel.csv [options]

  --file PATH            the panel (Parley's export, or any panel with --map)
  --map FIELD=COLUMN     read FIELD from COLUMN (repeat; fields: session, treatment, subject,
                         partner, supergame, round, action, partner_action)
  --by treatment|session|none   groups estimated separately (default treatment)
  --window all|after-rounds:R|last:N|supergames:A-B   supergames used (default all)
  --strategies ALLD,ALLC,Grim,TFT,WSLS,T2   the strategy set (default: those six)
  --bootstrap B          bootstrap replicates over subjects for standard errors (default 0)
  --seed S               seed of the bootstrap (default 1)
  --starts N             EM starting points
  --workers N            worker threads for the bootstrap (default 2)
  --json                 print JSON instead of a table
  --help                 this text

Example (Dal Bó & Fréchette 2011 panel):
  npm run -s estimate -- --file choices.csv --window after-rounds:110 --bootstrap 200 --seed 1 \\
    --map subject=subject --map action=cooperate --map partner_action=partner_cooperate`;

function fail(message: string): never {
  console.error(message);
  process.exit(1);
}

const argv = process.argv.slice(2);
const args = argv[0] === '--' ? argv.slice(1) : argv;
if (args.includes('--help') || args.includes('-h')) {
  console.log(USAGE);
  process.exit(0);
}
let parsed;
try {
  parsed = parseArgs({
    args,
    options: {
      file: { type: 'string' },
      map: { type: 'string', multiple: true },
      by: { type: 'string', default: 'treatment' },
      window: { type: 'string', default: 'all' },
      strategies: { type: 'string' },
      bootstrap: { type: 'string', default: '0' },
      seed: { type: 'string', default: '1' },
      starts: { type: 'string' },
      workers: { type: 'string', default: '2' },
      json: { type: 'boolean', default: false },
    },
  });
} catch (e) {
  // an unknown or malformed option: say which, then how to call it
  fail(`${e instanceof Error ? e.message : String(e)}\n\n${USAGE}`);
}
const { values } = parsed;

if (!values.file) fail(USAGE);
if (!['treatment', 'session', 'none'].includes(values.by)) fail(`--by must be treatment, session or none (got ${values.by})`);
const B = Number(values.bootstrap);
const seed = Number(values.seed);
if (!Number.isInteger(B) || B < 0) fail('--bootstrap must be a whole number ≥ 0');
if (!Number.isInteger(seed)) fail('--seed must be a whole number');

let result;
try {
  result = estimateFromCsv(readFileSync(values.file, 'utf8'), {
    map: values.map ?? [],
    by: values.by as GroupBy,
    window: values.window,
    strategies: values.strategies,
    starts: values.starts ? Number(values.starts) : undefined,
  });
} catch (e) {
  fail(e instanceof Error ? e.message : String(e));
}
for (const w of result.warnings) console.error(`warning${w.line ? ` (line ${w.line})` : ''}: ${w.message}`);
if (result.errors.length > 0) {
  for (const e of result.errors.slice(0, 100)) console.error(`${e.line ? `line ${e.line}` : 'file'}: ${e.message}`);
  fail(`${result.errors.length} error(s): nothing was estimated (the file is used whole or not at all)`);
}
if (result.groups.length === 0) fail('No subject has choices in this window.');

const boots: (BootstrapSummary | null)[] = [];
for (const g of result.groups) {
  if (B === 0) {
    boots.push(null);
    continue;
  }
  boots.push(
    await bootstrapOnWorkers(g.table, g.estimate, {
      B,
      seed,
      workers: Number(values.workers),
      onProgress: (done, total) => {
        if (!values.json && process.stderr.isTTY) process.stderr.write(`\r${g.group}: bootstrap ${done}/${total}`);
      },
    }),
  );
  if (!values.json && process.stderr.isTTY) process.stderr.write('\n');
}

if (values.json) {
  const groups = result.groups.map(({ group, estimate: e }, i) => {
    const boot = boots[i];
    const byName = (xs: number[]) => Object.fromEntries(e.strategies.map((id, k) => [id, xs[k]]));
    return {
      group,
      subjects: e.subjects,
      choices: e.choices,
      shares: byName(e.shares),
      // bootstrap SDs of each share and of β (key "beta")
      se: boot ? { ...byName(boot.sdShares), beta: boot.sdBeta } : null,
      beta: e.beta,
      gamma: e.gamma,
      logLik: e.logLik,
    };
  });
  console.log(JSON.stringify({ groups }));
} else {
  console.log(`window ${values.window}; strategies ${result.groups[0].estimate.strategies.join(', ')}`);
  console.log('β = probability that a choice follows the strategy; 1 − β = error probability; γ = tremble, β = 1/(1+exp(−1/γ))');
  if (B > 0) console.log(`standard errors: bootstrap over subjects, B = ${B}, seed = ${seed}`);
  result.groups.forEach(({ group, estimate: e }, i) => {
    const boot = boots[i];
    const se = (x: number | undefined) => (x === undefined ? '' : `(${x.toFixed(4)})`.padStart(10));
    console.log(
      `\n${group}: N = ${e.subjects} subjects, ${e.choices} choices, ln L = ${e.logLik.toFixed(4)}, AIC ${e.aic.toFixed(2)}, BIC ${e.bic.toFixed(2)}`,
    );
    e.strategies.forEach((id, k) => console.log(`  ${id.padEnd(8)}${e.shares[k].toFixed(4).padStart(8)}${se(boot?.sdShares[k])}`));
    console.log(`  ${'β'.padEnd(8)}${e.beta.toFixed(4).padStart(8)}${se(boot?.sdBeta)}`);
    console.log(`  ${'1 − β'.padEnd(8)}${e.errorProbability.toFixed(4).padStart(8)}`);
    console.log(`  ${'γ'.padEnd(8)}${e.gamma.toFixed(4).padStart(8)}`);
  });
}
