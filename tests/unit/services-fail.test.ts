// `fail()` in scripts/lib/services.mjs ends the script: nothing after the call runs (a failed check
// must not go on to apt-get, a build or the suite), what was started is stopped, the exit code is 1.
// Real child processes running the real module.
import { spawn } from 'node:child_process';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { alive } from '#tests/helpers/processes';

const services = path.resolve('scripts/lib/services.mjs');

/** Runs an ES module body with `fail`, `keep` and `spawn` in scope; its exit code and output. */
function runScript(body: string): Promise<{ code: number | null; stdout: string; stderr: string }> {
  const script = `import { spawn } from 'node:child_process';
import { fail, keep } from ${JSON.stringify(services)};
${body}`;
  return new Promise((resolve) => {
    const child = spawn(process.execPath, ['--input-type=module', '-e', script], { stdio: ['ignore', 'pipe', 'pipe'] });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => (stdout += d.toString()));
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString()));
    child.on('exit', (code) => resolve({ code, stdout, stderr }));
  });
}

describe('fail()', () => {
  it('stops a plain (synchronous) caller: the next line never runs', async () => {
    const r = await runScript(`function check() { fail('the check failed', 'a hint'); console.log('went on to apt-get'); }
check();
console.log('after the check');`);
    expect(r.code).toBe(1);
    expect(r.stdout).toBe('');
    expect(r.stderr).toContain('[parley] ✗ the check failed');
    expect(r.stderr).toContain('[parley]   a hint');
    // The throw that stops the caller is ours and expected: no stack trace.
    expect(r.stderr).not.toContain('Stopping');
  });

  it('stops an async caller and top-level await alike', async () => {
    const r =
      await runScript(`async function start() { await new Promise((r) => setTimeout(r, 10)); fail('did not start'); console.log('inside'); }
await start();
console.log('after');`);
    expect(r.code).toBe(1);
    expect(r.stdout).toBe('');
    expect(r.stderr).toContain('[parley] ✗ did not start');
    expect(r.stderr).not.toContain('Stopping');
  });

  it('stops the children started before it, then exits 1', async () => {
    const r =
      await runScript(`const child = keep('sleeper', spawn(process.execPath, ['-e', 'setInterval(() => {}, 1000)'], { stdio: 'ignore' }));
console.log('PID ' + child.pid);
fail('something failed');
console.log('went on');`);
    expect(r.code).toBe(1);
    const pid = Number(/PID (\d+)/.exec(r.stdout)?.[1]);
    expect(pid).toBeGreaterThan(0);
    expect(r.stdout).not.toContain('went on');
    expect(alive(pid)).toBe(false);
  });
});
