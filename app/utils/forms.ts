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

/** Form data on the server, or the live fields in the browser (the forms' own checks). */
export type FormSource = FormData | Map<string, string>;

/** A text field, trimmed; undefined when absent or a file. */
export const formText = (f: FormSource, k: string): string | undefined => {
  const v = f.get(k);
  return typeof v === 'string' ? v.trim() : undefined;
};

/** '' → undefined (zod then says "must be a number"); anything else through Number (NaN fails). A decimal comma is read as a point. */
export const formNumber = (f: FormSource, k: string): number | undefined => {
  const v = formText(f, k);
  if (v === undefined || v === '') return undefined;
  return Number(v.replace(',', '.'));
};
