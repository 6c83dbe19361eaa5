// The estimation command line as a researcher calls it (npm run -s estimate -- …).
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';

const run = (...args: string[]) =>
  spawnSync(process.execPath, ['--import', 'tsx', 'scripts/estimate.ts', '--', ...args], { encoding: 'utf8', timeout: 60_000 });

// Each test starts Node with tsx (a second or two, much more on a busy machine).
describe('npm run estimate', { timeout: 90_000 }, () => {
  it('--help prints the usage and exits 0 (it crashed with ERR_PARSE_ARGS_UNKNOWN_OPTION)', () => {
    const r = run('--help');
    expect(r.status).toBe(0);
    expect(r.stdout).toContain('Usage: npm run -s estimate -- --file panel.csv [options]');
    expect(r.stdout).toContain('--window all|after-rounds:R|last:N|supergames:A-B');
    expect(r.stderr).not.toContain('ERR_PARSE_ARGS');
  });

  it('an unknown option names it, prints the usage and exits 1 without a stack trace', () => {
    const r = run('--bogus');
    expect(r.status).toBe(1);
    expect(r.stderr).toContain("Unknown option '--bogus'");
    expect(r.stderr).toContain('Usage:');
    expect(r.stderr).not.toMatch(/at .*\.ts:\d+/);
  });

  it('estimates the Dal Bó & Fréchette (2011) panel from the command line', () => {
    // Source: Dal Bó & Fréchette (2011), Table 7, D5R32 (methods.md §5: ALLD 0.9196, TFT 0.0804).
    const r = run(
      '--file',
      '../shared/data/dbf2011/choices.csv',
      '--window',
      'after-rounds:110',
      '--json',
      '--map',
      'subject=subject',
      '--map',
      'action=cooperate',
      '--map',
      'partner_action=partner_cooperate',
    );
    expect(r.status, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout) as {
      groups: { group: string; subjects: number; choices: number; shares: Record<string, number>; logLik: number }[];
    };
    const d5r32 = out.groups.find((g) => g.group === 'D5R32')!;
    expect([d5r32.subjects, d5r32.choices]).toEqual([44, 832]);
    expect(d5r32.shares.ALLD).toBeCloseTo(0.9196, 4);
    expect(d5r32.shares.TFT).toBeCloseTo(0.0804, 4);
    expect(d5r32.logLik).toBeCloseTo(-199.1452, 4);
  });
});
