// Unit tests live in one place, tests/unit (vitest.config.ts runs only that folder): a test file
// left beside the code it tests would silently never run.
import { readdirSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const root = fileURLToPath(new URL('../..', import.meta.url));

function testFilesUnder(dir: string): string[] {
  return readdirSync(path.join(root, dir), { recursive: true, encoding: 'utf8' })
    .filter((f) => /\.test\.tsx?$/.test(f))
    .map((f) => path.join(dir, f));
}

describe('test layout', () => {
  it('keeps no test files beside the code (app, realtime, scripts, seeds, drizzle)', () => {
    const stray = ['app', 'realtime', 'scripts', 'seeds', 'drizzle'].flatMap(testFilesUnder);
    expect(stray).toEqual([]);
  });
});
