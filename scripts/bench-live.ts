/**
 * The live benchmark's load generator (run by scripts/bench-live.mjs, which starts MariaDB,
 * maildev, the production server and a bare socket.io echo server, and passes their addresses).
 * In its own process, as phones in a lecture hall are outside the server:
 *   1. the floor of this machine, now: a bare socket.io echo with the same N clients (every client
 *      emits at once, emit-with-ack round trip) and a bare MariaDB INSERT+COMMIT on the same instance;
 *   2. an instructor signs in, creates a course, a design and K sessions through the real pages,
 *      imports the N participants as a roster; every participant signs in through the real sign-in
 *      (codes read from maildev in batches) and joins with the join code;
 *   3. every phone watches its session, a Floor and a Big-screen watcher per session are connected,
 *      the sessions start and every phone answers the moment its choosing view arrives;
 *   4. prints the figures and their ratios to the floor, and writes them as JSON.
 * Only 127.0.0.1; every loop is bounded in count and time.
 */
import fs from 'node:fs';
import { spawnSync } from 'node:child_process';
import mysql from 'mysql2/promise';
import type { RowDataPacket } from 'mysql2/promise';
import { io, type Socket } from 'socket.io-client';
import { Client } from '#tests/helpers/http';
import { connectPhone, type CrowdResult, type Phone, playCrowd, quantile } from '#tests/helpers/crowd';
import type { TestSocket } from '#tests/helpers/live';

const HELP = `npm run bench:live -- [--n 50] [--supergames 2] [--sessions 1] [--delta 0.75] [--seed 118] [--json out.json] [--timeout 300]
  --n           participants in all (even; split evenly over the sessions)
  --supergames  supergames per session
  --sessions    K sessions played at the same time (N/K phones each)
  --delta       continuation probability of the design
  --seed        session seed: the same seed gives the same supergame lengths at every N
  --json        also write the figures to this file
  --timeout     give up the play after this many seconds (reported as incomplete)`;

if (process.argv.includes('--help')) {
  console.log(HELP);
  process.exit(0);
}

function flags() {
  const a = process.argv.slice(2);
  const get = (name: string, dflt: string) => (a.includes(`--${name}`) ? a[a.indexOf(`--${name}`) + 1] : dflt);
  const f = {
    n: Number(get('n', '50')),
    supergames: Number(get('supergames', '2')),
    sessions: Number(get('sessions', '1')),
    delta: Number(get('delta', '0.75')),
    seed: get('seed', '118'),
    json: a.includes('--json') ? get('json', '') : null,
    timeoutS: Number(get('timeout', '300')),
  };
  const perSession = f.n / f.sessions;
  if (!Number.isInteger(perSession) || perSession < 2 || perSession % 2 !== 0 || f.n > 2000) {
    throw new Error(`--n ${f.n} must split into ${f.sessions} equal even groups (at most 2000 phones)`);
  }
  if (!(f.supergames >= 1 && f.supergames <= 50) || !(f.delta > 0 && f.delta < 1) || !(f.timeoutS > 0))
    throw new Error('bad --supergames, --delta or --timeout');
  return f;
}

const need = (name: string) => {
  const v = process.env[name];
  if (!v) throw new Error(`${name} is not set: run this through npm run bench:live`);
  return v;
};
const URL_ = need('BENCH_URL');
const MAIL_API = need('BENCH_MAIL_API');
const ECHO_URL = need('BENCH_ECHO_URL');
/** the server process, or with --instances n the n processes of the cluster (figures summed) */
const SERVER_PIDS = need('BENCH_SERVER_PID').split(',').map(Number);
const INSTANCES = process.env.BENCH_INSTANCES ? Number(process.env.BENCH_INSTANCES) : null;
const RESULTS_DIR = process.env.BENCH_RESULTS_DIR ?? null;
const DATABASE_URL = need('DATABASE_URL');
for (const u of [URL_, MAIL_API, ECHO_URL])
  if (!u.startsWith('http://127.0.0.1:')) throw new Error(`${u}: the benchmark talks to 127.0.0.1 only`);

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const ms = (x: number) => (Number.isFinite(x) ? (x >= 10_000 ? `${(x / 1000).toFixed(1)} s` : `${x.toFixed(x < 10 ? 1 : 0)} ms`) : '—');
const stats = (xs: number[]) => ({
  n: xs.length,
  p50: quantile(xs, 0.5),
  p95: quantile(xs, 0.95),
  p99: quantile(xs, 0.99),
  max: xs.length ? Math.max(...xs) : Number.NaN,
});
const say = (line: string) => process.stdout.write(`[bench:live] ${line}\n`);

/** Runs `work` over items, at most `width` at a time, in order. */
async function inBatches<T, R>(items: T[], width: number, work: (item: T, index: number) => Promise<R>): Promise<R[]> {
  const out: R[] = [];
  for (let i = 0; i < items.length; i += width) out.push(...(await Promise.all(items.slice(i, i + width).map((x, k) => work(x, i + k)))));
  return out;
}

// ── The server process, from outside: CPU seconds and memory from /proc ───────────────────────────
const TICKS = Number(spawnSync('getconf', ['CLK_TCK'], { encoding: 'utf8' }).stdout.trim()) || 100;
function cpuSeconds(pids: readonly number[]) {
  return pids.reduce((sum, pid) => sum + cpuSecondsOf(pid), 0);
}
function cpuSecondsOf(pid: number) {
  const stat = fs.readFileSync(`/proc/${pid}/stat`, 'utf8');
  const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
  // utime and stime are fields 14 and 15 of /proc/<pid>/stat; here indexed after "(comm) ".
  return (Number(fields[11]) + Number(fields[12])) / TICKS;
}
function statusKb(pids: readonly number[], key: 'VmRSS' | 'VmHWM') {
  return pids.reduce((sum, pid) => sum + statusKbOf(pid, key), 0);
}
function statusKbOf(pid: number, key: 'VmRSS' | 'VmHWM') {
  const m = new RegExp(`^${key}:\\s+(\\d+) kB`, 'm').exec(fs.readFileSync(`/proc/${pid}/status`, 'utf8'));
  return m ? Number(m[1]) : Number.NaN;
}
const loadavg = () => fs.readFileSync('/proc/loadavg', 'utf8').split(' ').slice(0, 3).join(' ');

// ── 1. The floor ────────────────────────────────────────────────────────────────────────────────
async function echoFloor(n: number, bursts: number) {
  const clients: Socket[] = await inBatches(
    Array.from({ length: n }),
    50,
    () =>
      new Promise<Socket>((resolve, reject) => {
        const s = io(ECHO_URL, { transports: ['websocket'], forceNew: true, reconnection: false });
        s.once('connect', () => resolve(s));
        s.once('connect_error', reject);
      }),
  );
  const rtt: number[] = [];
  // The first burst warms the connections up and is not counted.
  for (let b = 0; b <= bursts; b++) {
    const times = await Promise.all(
      clients.map(async (s, i) => {
        const t0 = performance.now();
        await s
          .timeout(60_000)
          .emitWithAck('echo', { sessionId: 1, supergame: 1, round: b + 1, action: 'C', clientChoiceId: `echo-${i}-${b}-xxxxxxxx` });
        return performance.now() - t0;
      }),
    );
    if (b > 0) rtt.push(...times);
    await sleep(50);
  }
  for (const s of clients) s.close();
  return rtt;
}

async function mariadbFloor(commits: number) {
  const conn = await mysql.createConnection({ uri: DATABASE_URL });
  try {
    await conn.query('DROP TABLE IF EXISTS bench_floor');
    await conn.query(
      'CREATE TABLE bench_floor (id BIGINT AUTO_INCREMENT PRIMARY KEY, session_id INT NOT NULL, seq INT NOT NULL, action CHAR(1) NOT NULL, at DATETIME(3) NOT NULL, client_choice_id VARCHAR(64) NOT NULL) ENGINE=InnoDB',
    );
    const times: number[] = [];
    for (let i = 0; i < commits; i++) {
      const t0 = performance.now();
      await conn.beginTransaction();
      await conn.execute('INSERT INTO bench_floor (session_id, seq, action, at, client_choice_id) VALUES (?, ?, ?, NOW(3), ?)', [
        1,
        i + 1,
        'C',
        `floor-${i}-xxxxxxxx`,
      ]);
      await conn.commit();
      times.push(performance.now() - t0);
    }
    return times;
  } finally {
    await conn.query('DROP TABLE IF EXISTS bench_floor').catch(() => undefined);
    await conn.end();
  }
}

// ── 2. Set-up through the real pages ─────────────────────────────────────────────────────────────
interface Mail {
  subject: string;
  to: { address: string }[];
}

async function mails(): Promise<Mail[]> {
  const res = await fetch(`${MAIL_API}/api/email`);
  if (!res.ok) throw new Error(`maildev answered ${res.status}`);
  return (await res.json()) as Mail[];
}
const clearMail = async () => void (await fetch(`${MAIL_API}/api/email/all`, { method: 'DELETE' }));

/** Signs a batch in through the real flow: code requests, then every code read from maildev at once. */
async function signInBatch(emails: string[]): Promise<Client[]> {
  const clients = emails.map(() => new Client(URL_));
  await Promise.all(
    clients.map(async (c, i) => {
      const r = await c.post('/sign-in', { email: emails[i] });
      if (r.status !== 302 || r.headers.get('location') !== '/sign-in/code')
        throw new Error(`sign-in of ${emails[i]} answered ${r.status}`);
    }),
  );
  const codes = new Map<string, string>();
  const until = Date.now() + 60_000;
  while (codes.size < emails.length) {
    if (Date.now() > until) throw new Error(`only ${codes.size} of ${emails.length} sign-in codes arrived within 60 s`);
    for (const m of await mails()) {
      const code = /(\d{6})/.exec(m.subject)?.[1];
      if (code && /sign-in code/.test(m.subject)) codes.set(m.to[0].address.toLowerCase(), code);
    }
    if (codes.size < emails.length) await sleep(100);
  }
  await clearMail();
  await Promise.all(
    clients.map(async (c, i) => {
      const r = await c.post('/sign-in/code', { intent: 'verify', code: codes.get(emails[i].toLowerCase())! });
      if (r.status !== 302 || !c.cookies.has('__parley_auth'))
        throw new Error(`the code of ${emails[i]} was refused (${r.status} → ${r.headers.get('location')})`);
    }),
  );
  return clients;
}

function located(res: Response, pattern: RegExp, what: string) {
  const m = pattern.exec(res.headers.get('location') ?? '');
  if (res.status !== 302 || !m) throw new Error(`${what} answered ${res.status} (${res.headers.get('location')})`);
  return Number(m[1]);
}

async function setUp(f: ReturnType<typeof flags>) {
  const run = `${Date.now().toString(36)}${process.pid}`;
  await clearMail();
  const [instructor] = await signInBatch([`bench-inst-${run}@bench.parley.test`]);
  const courseId = located(
    await instructor.post('/courses/new', { title: `Live benchmark ${run}` }),
    /^\/courses\/(\d+)$/,
    'creating the course',
  );
  const designId = located(
    await instructor.post(`/courses/${courseId}/designs/new`, {
      name: `Benchmark δ=${f.delta}`,
      'payoffs.R': 40,
      'payoffs.S': 12,
      'payoffs.T': 50,
      'payoffs.P': 25,
      'labels.C': 'Cooperate',
      'labels.D': 'Defect',
      delta: f.delta,
      supergames: f.supergames,
      // Long rounds: every phone answers at once, so a timeout would mean the server fell behind.
      roundSeconds: 600,
      'termination.kind': 'standard',
      'oddCount.kind': 'computer',
      'oddCount.strategy': 'TFT',
      timeout: 'repeat-last',
      'credit.kind': 'participation',
      'credit.credit': 1,
      instructions: '',
    }),
    /^\/courses\/\d+\/designs\/(\d+)/,
    'saving the design',
  );
  const emails = Array.from({ length: f.n }, (_, i) => `bench-${run}-${i}@bench.parley.test`);
  const csv = ['E-mail,Name,Student ID', ...emails.map((e, i) => `${e},Phone ${i},B${i}`)].join('\n');
  const roster = await instructor.post(`/courses/${courseId}/roster`, { intent: 'import', fileName: 'bench.csv', csv });
  if (roster.status !== 200) throw new Error(`the roster import answered ${roster.status}`);
  await clearMail();
  const sessions: { sessionId: number; code: string }[] = [];
  for (let k = 0; k < f.sessions; k++) {
    const sessionId = located(
      await instructor.post(`/courses/${courseId}/sessions`, { designId, admission: 'roster', seed: f.seed, emailDomain: '' }),
      /sessions\/(\d+)/,
      'opening a session',
    );
    const page = await (await instructor.get(`/courses/${courseId}/sessions/${sessionId}`)).text();
    const code = /data-testid="join-code">([A-Z0-9]{6})</.exec(page)?.[1];
    if (!code) throw new Error('no join code on the conductor page');
    sessions.push({ sessionId, code });
  }
  const participants: Client[] = [];
  for (let i = 0; i < emails.length; i += 50) {
    participants.push(...(await signInBatch(emails.slice(i, i + 50))));
    if (i % 200 === 0) say(`signed in ${participants.length} of ${f.n}`);
  }
  const perSession = f.n / f.sessions;
  await inBatches(participants, 20, async (p, i) => {
    const { code } = sessions[Math.floor(i / perSession)];
    const res = await p.post(`/join/${code}`, {});
    if (res.status !== 302) throw new Error(`joining answered ${res.status}`);
  });
  return { instructor, courseId, sessions, participants, perSession };
}

// ── 3 and 4 ──────────────────────────────────────────────────────────────────────────────────────
async function main() {
  const f = flags();
  const startedAt = new Date();
  const load0 = loadavg();
  say(`N = ${f.n} in ${f.sessions} session(s), ${f.supergames} supergame(s), δ = ${f.delta}, seed ${f.seed}; load average ${load0}`);

  say('floor: bare socket.io echo and MariaDB INSERT+COMMIT…');
  const echo = stats(await echoFloor(f.n, 10));
  const commit = stats(await mariadbFloor(500));

  say('set-up through the real pages and sign-in…');
  const t0 = performance.now();
  const { instructor, sessions, participants, perSession } = await setUp(f);
  say(`set-up took ${((performance.now() - t0) / 1000).toFixed(1)} s`);

  const phones: Phone[] = await inBatches(participants, 50, async (p, i) => ({
    socket: await connectPhone(URL_, p.cookieHeader()),
    sessionId: sessions[Math.floor(i / perSession)].sessionId,
  }));
  const staff: TestSocket[] = [];
  const staffViews = { floor: 0, bigScreen: 0 };
  const conductor = await connectPhone(URL_, instructor.cookieHeader());
  for (const { sessionId } of sessions) {
    for (const as of ['floor', 'big-screen'] as const) {
      const s = await connectPhone(URL_, instructor.cookieHeader());
      const res = await s.emitWithAck('session:watch', { sessionId, as });
      if (!res.ok) throw new Error(`the ${as} watcher was refused: ${res.code}`);
      s.on(as === 'floor' ? 'view:floor' : 'view:big-screen', () => (as === 'floor' ? staffViews.floor++ : staffViews.bigScreen++));
      staff.push(s);
    }
  }

  let cpu0 = 0;
  let peakRssKb = 0;
  const poll = setInterval(() => (peakRssKb = Math.max(peakRssKb, statusKb(SERVER_PIDS, 'VmRSS'))), 100);
  const rssBeforeKb = statusKb(SERVER_PIDS, 'VmRSS');
  const playStart = performance.now();
  say(`${phones.length} phones watching; starting`);
  const result: CrowdResult = await playCrowd(phones, {
    timeoutMs: f.timeoutS * 1000,
    idPrefix: `bench-${process.pid}`,
    start: async () => {
      cpu0 = cpuSeconds(SERVER_PIDS);
      for (const { sessionId } of sessions) {
        const res = await conductor.emitWithAck('session:control', { sessionId, command: 'start' });
        if (!res.ok) throw new Error(`start was refused: ${res.code} ${res.message}`);
      }
    },
  });
  const cpu1 = cpuSeconds(SERVER_PIDS);
  const playSeconds = (performance.now() - playStart) / 1000;
  clearInterval(poll);
  peakRssKb = Math.max(peakRssKb, statusKb(SERVER_PIDS, 'VmRSS'));
  const hwmKb = statusKb(SERVER_PIDS, 'VmHWM');
  const load1 = loadavg();
  for (const s of [...phones.map((p) => p.socket), ...staff, conductor]) s.close();

  // Stored rows against acknowledged choices, counted in MariaDB. After an incomplete run the
  // server may still be storing choices that were in flight: wait until the count stands still.
  const conn = await mysql.createConnection({ uri: DATABASE_URL });
  const ids = sessions.map((s) => s.sessionId);
  type Stored = RowDataPacket & { id: string | null; source: string; n: number };
  const storedRows = async () =>
    (
      await conn.query<Stored[]>(
        `SELECT client_choice_id AS id, source, COUNT(*) AS n FROM choices WHERE session_id IN (?) GROUP BY client_choice_id, source`,
        [ids],
      )
    )[0];
  let stored = await storedRows();
  for (let i = 0; i < 60 && !result.complete; i++) {
    await sleep(2000);
    const again = await storedRows();
    if (again.length === stored.length) break;
    stored = again;
  }
  const [draws] = await conn.query<(RowDataPacket & { supergame: number; rounds: number })[]>(
    `SELECT supergame, rounds_played AS rounds FROM supergame_draws WHERE session_id = ? ORDER BY supergame`,
    [ids[0]],
  );
  await conn.end();
  const roundsPlayed = draws.map((d) => Number(d.rounds));
  const bySource: Record<string, number> = {};
  for (const r of stored) bySource[r.source] = (bySource[r.source] ?? 0) + Number(r.n);
  const player = stored.filter((r) => r.source === 'player');
  const storedPlayer = bySource.player ?? 0;
  const storedIds = new Set(player.map((r) => r.id));
  const lost = [...result.acked].filter((id) => !storedIds.has(id)).length;
  const duplicated = player.reduce((a, r) => a + Number(r.n) - 1, 0);
  /** stored but never acknowledged: in flight when an incomplete run was cut off */
  const unacknowledged = [...storedIds].filter((id) => id !== null && !result.acked.has(id)).length;

  const ack = stats(result.ackMs);
  const slower = stats(result.slowerPartnerMs);
  const boundary = stats(result.boundaryMs);
  const choicesAcked = result.acked.size;
  const cpuPerChoiceMs = choicesAcked ? ((cpu1 - cpu0) * 1000) / choicesAcked : Number.NaN;
  const commit1 = git('rev-parse', '--short', 'HEAD');
  const out = {
    date: startedAt.toISOString(),
    commit: commit1,
    dirty: git('status', '--porcelain') !== '',
    machine: { cores: (await import('node:os')).cpus().length, loadavgBefore: load0, loadavgAfter: load1 },
    config: { n: f.n, sessions: f.sessions, perSession, supergames: f.supergames, delta: f.delta, seed: f.seed, roundsPlayed },
    floor: { echoMs: echo, insertCommitMs: commit },
    live: {
      complete: result.complete,
      phonesFinished: result.finished,
      playSeconds,
      ackMs: ack,
      slowerPartnerMs: slower,
      boundaryMs: boundary,
      serverCpuSeconds: cpu1 - cpu0,
      serverCpuMsPerChoice: cpuPerChoiceMs,
      serverRssBeforeMb: rssBeforeKb / 1024,
      serverPeakRssMb: peakRssKb / 1024,
      serverVmHwmMb: hwmKb / 1024,
      staffViewsReceived: staffViews,
      reconnects: result.reconnects,
      refused: result.refused,
    },
    rows: { emitted: result.emitted, acknowledged: choicesAcked, storedPlayer, storedBySource: bySource, lost, duplicated, unacknowledged },
    ratios: {
      ackP50ToEchoP50: ack.p50 / echo.p50,
      ackP95ToEchoP95: ack.p95 / echo.p95,
      slowerPartnerP95ToEchoP95: slower.p95 / echo.p95,
      boundaryP95ToEchoP95: boundary.p95 / echo.p95,
      ackP50ToInsertCommitP50: ack.p50 / commit.p50,
    },
    targets: {
      ackP50: { target: '≤ 3× echo p50', met: ack.p50 <= 3 * echo.p50 },
      ackP95: { target: '≤ 3× echo p95', met: ack.p95 <= 3 * echo.p95 },
      boundaryP95: { target: '≤ 500 ms', met: boundary.p95 <= 500 },
      cpuPerChoice: { target: '≤ 1 ms', met: cpuPerChoiceMs <= 1 },
      peakRss: { target: '≤ 400 MB', met: peakRssKb / 1024 <= 400 },
      rows: {
        target: 'stored = acknowledged, none lost or duplicated',
        met: lost === 0 && duplicated === 0 && (result.complete ? unacknowledged === 0 && storedPlayer === choicesAcked : true),
      },
    },
  };

  const r = (x: number) => (Number.isFinite(x) ? `${x.toFixed(1)}×` : '—');
  const line = (label: string, s: ReturnType<typeof stats>, ratio = '') =>
    `  ${label.padEnd(34)} ${ms(s.p50).padStart(9)} ${ms(s.p95).padStart(9)} ${ms(s.p99).padStart(9)} ${ms(s.max).padStart(9)}   ${ratio}`;
  console.log(`
Live benchmark${INSTANCES === null ? '' : ` — ${INSTANCES} process${INSTANCES > 1 ? 'es' : ''} behind HAProxy, Redis adapter`} — ${out.date}, commit ${commit1}${out.dirty ? ' (uncommitted changes)' : ''}
N = ${f.n} phones in ${f.sessions} session(s) of ${perSession}, ${f.supergames} supergame(s) of ${roundsPlayed.join(' + ')} rounds, δ = ${f.delta}, seed ${f.seed}
load average before ${load0}, after ${load1} (${out.machine.cores} cores)

                                           p50       p95       p99       max   ratio to the floor
floor
${line(`socket.io echo, ${f.n} clients at once`, echo)}
${line('MariaDB INSERT+COMMIT (500)', commit)}
Parley
${line(`choice ack (${ack.n})`, ack, `p50 ${r(out.ratios.ackP50ToEchoP50)} echo p50, p95 ${r(out.ratios.ackP95ToEchoP95)} echo p95`)}
${line(`slower partner → result (${slower.n})`, slower, `p95 ${r(out.ratios.slowerPartnerP95ToEchoP95)} echo p95`)}
${line(`supergame boundary (${boundary.n})`, boundary, `p95 ${r(out.ratios.boundaryP95ToEchoP95)} echo p95`)}

  server CPU per choice      ${cpuPerChoiceMs.toFixed(2)} ms   (${(cpu1 - cpu0).toFixed(1)} s over ${choicesAcked} choices, play ${playSeconds.toFixed(1)} s)
  server RSS                 ${(rssBeforeKb / 1024).toFixed(0)} MB before, peak ${(peakRssKb / 1024).toFixed(0)} MB during play (VmHWM ${(hwmKb / 1024).toFixed(0)} MB)
  staff views received       floor ${staffViews.floor}, big screen ${staffViews.bigScreen}
  rows                       ${choicesAcked} acknowledged, ${storedPlayer} stored (player), lost ${lost}, duplicated ${duplicated}, stored but not acknowledged ${unacknowledged}${result.complete ? '' : ' (in flight at the cut-off)'}; by source ${JSON.stringify(bySource)}
  play                       ${result.complete ? 'complete' : `INCOMPLETE after ${f.timeoutS} s`}: ${result.finished}/${f.n} phones finished, ${result.reconnects} reconnects, refused ${JSON.stringify(result.refused)}

targets (issue 11): ${Object.entries(out.targets)
    .map(([k, t]) => `${k} ${t.met ? '✓' : '✗'} (${t.target})`)
    .join('; ')}`);
  if (f.json) {
    fs.writeFileSync(f.json, `${JSON.stringify(out, null, 2)}\n`);
    say(`wrote ${f.json}`);
  }
  if (INSTANCES !== null && RESULTS_DIR) compareInstances(out, INSTANCES, RESULTS_DIR);
  // The run failed (not merely slow) when play did not complete or rows do not match the acks.
  process.exit(result.complete && out.targets.rows.met ? 0 : 1);
}

interface Kept {
  commit: string;
  config: { n: number; sessions: number; supergames: number; seed: string };
  live: { complete: boolean; playSeconds: number; ackMs: { p50: number; p95: number }; serverCpuMsPerChoice: number };
  rows: { acknowledged: number };
}

/**
 * --instances n: keeps this run's figures as instances-<n>.json and, when the run with the other
 * count (1 or 2) of the same configuration is there, prints 2 processes against 1: choices per
 * second of play, ack p50/p95, CPU per choice (summed over the processes).
 */
function compareInstances(out: Kept, n: number, dir: string) {
  fs.writeFileSync(`${dir}/instances-${n}.json`, `${JSON.stringify(out, null, 2)}\n`);
  const otherFile = `${dir}/instances-${n === 1 ? 2 : 1}.json`;
  if ((n !== 1 && n !== 2) || !fs.existsSync(otherFile)) return;
  const other = JSON.parse(fs.readFileSync(otherFile, 'utf8')) as Kept;
  const same = (['n', 'sessions', 'supergames', 'seed'] as const).every((k) => other.config[k] === out.config[k]);
  if (!same || !other.live.complete || !out.live.complete) {
    say(`no 2:1 ratio: ${otherFile} is of another configuration or an incomplete run`);
    return;
  }
  const [one, two] = n === 1 ? [out, other] : [other, out];
  const rate = (k: Kept) => k.rows.acknowledged / k.live.playSeconds;
  console.log(`
2 processes : 1 process (same N, sessions, seed; through HAProxy and Redis both times; commits ${one.commit} / ${two.commit})
  choices per second of play   ${rate(two).toFixed(0)} : ${rate(one).toFixed(0)}   = ${(rate(two) / rate(one)).toFixed(2)}
  choice ack p50               ${ms(two.live.ackMs.p50)} : ${ms(one.live.ackMs.p50)}   = ${(two.live.ackMs.p50 / one.live.ackMs.p50).toFixed(2)}
  choice ack p95               ${ms(two.live.ackMs.p95)} : ${ms(one.live.ackMs.p95)}   = ${(two.live.ackMs.p95 / one.live.ackMs.p95).toFixed(2)}
  server CPU per choice (sum)  ${two.live.serverCpuMsPerChoice.toFixed(2)} ms : ${one.live.serverCpuMsPerChoice.toFixed(2)} ms   = ${(two.live.serverCpuMsPerChoice / one.live.serverCpuMsPerChoice).toFixed(2)}`);
}

function git(...args: string[]) {
  return spawnSync('git', args, { encoding: 'utf8' }).stdout?.trim() ?? '';
}

main().catch((error) => {
  console.error('[bench:live] failed:', error);
  process.exit(1);
});
