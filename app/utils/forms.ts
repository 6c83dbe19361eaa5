import type { z } from 'zod';

/** First message per field, keyed by the field's name, for errors shown beside the fields. */
export function fieldErrors(error: z.ZodError): Record<string, string> {
  const out: Record<string, string> = {};
  for (const issue of error.issues) {
    const key = issue.path.length ? issue.path.join('.') : 'form';
    out[key] ??= issue.message;
  }
  return out;
}
