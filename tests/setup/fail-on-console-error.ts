import { afterEach, vi } from 'vitest';

// A console.error during a unit test is a defect the test must not hide.
let errors: unknown[][] = [];
const original = console.error;
console.error = (...args: unknown[]) => {
  errors.push(args);
  original(...args);
};
afterEach(() => {
  const seen = errors;
  errors = [];
  vi.restoreAllMocks();
  if (seen.length) throw new Error(`console.error was called: ${seen.map((a) => a.map(String).join(' ')).join('\n')}`);
});
