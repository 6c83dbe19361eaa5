/**
 * A course roster CSV (e-mail, name, student id) → validated rows with per-line errors, before
 * anything is written (product.md, "Data": roster upload). Pure, so it runs in a unit test with
 * the committed fixtures (tests/fixtures/roster/) exactly as in the app.
 *
 * Accepted: UTF-8 with or without a byte-order mark; comma, semicolon or tab between fields;
 * columns in any order; header names matched loosely ("E-mail", "email address", "Student ID",
 * "student_number", …; a "first name" + "last name" pair makes the name). Blank lines are skipped.
 * Line numbers are the file's own (the header is line 1), quoted line breaks included.
 */
import Papa from 'papaparse';
import { z } from 'zod';

export const ROSTER_LIMITS = {
  /** bytes: a class list is a few kilobytes; a spreadsheet exported with images is not a roster */
  maxBytes: 512 * 1024,
  maxRows: 2000,
} as const;

export type RosterField = 'email' | 'name' | 'studentId';

export const ROSTER_FIELD_WORDS: Record<RosterField, string> = { email: 'e-mail', name: 'name', studentId: 'student id' };

/** Header names, compared after lower-casing and dropping everything but letters and digits. */
const HEADER_ALIASES: Record<string, RosterField | 'first' | 'last'> = {
  email: 'email',
  emailaddress: 'email',
  mail: 'email',
  mailaddress: 'email',
  name: 'name',
  fullname: 'name',
  studentname: 'name',
  displayname: 'name',
  firstname: 'first',
  givenname: 'first',
  lastname: 'last',
  surname: 'last',
  familyname: 'last',
  studentid: 'studentId',
  studentnumber: 'studentId',
  studentno: 'studentId',
  id: 'studentId',
  sid: 'studentId',
  matriculationnumber: 'studentId',
};

export const normaliseHeader = (h: string) => h.toLowerCase().replace(/[^a-z0-9]/g, '');

export interface RosterRow {
  line: number;
  email: string;
  name: string;
  studentId: string;
}

export interface RosterIssue {
  /** null for the file as a whole */
  line: number | null;
  message: string;
}

export interface ParsedRoster {
  rows: RosterRow[];
  errors: RosterIssue[];
}

const rowSchema = z.object({
  email: z
    .string()
    .trim()
    .min(1, 'e-mail is empty')
    .max(254, 'e-mail is longer than 254 characters')
    .pipe(z.email('is not an e-mail address'))
    .transform((e) => e.toLowerCase()),
  name: z.string().trim().min(1, 'name is empty').max(120, 'name is longer than 120 characters'),
  studentId: z.string().trim().min(1, 'student id is empty').max(60, 'student id is longer than 60 characters'),
});

function issueMessage(issue: z.core.$ZodIssue, raw: Record<RosterField, string>): string {
  const field = issue.path[0] as RosterField;
  if (field === 'email' && issue.code !== 'too_small' && issue.code !== 'too_big')
    return `bad e-mail "${raw.email.trim()}": ${issue.message}`;
  return issue.message;
}

/** Parses and validates every line; an empty `errors` means the whole file may be imported. */
export function parseRoster(text: string): ParsedRoster {
  const errors: RosterIssue[] = [];
  const rows: RosterRow[] = [];
  const input = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  if (input.trim() === '') return { rows, errors: [{ line: null, message: 'the file is empty' }] };
  // A file saved in another encoding arrives with replacement characters where accents were.
  if (input.includes('\uFFFD')) {
    return {
      rows,
      errors: [{ line: null, message: 'the file is not UTF-8 text: save it from your spreadsheet as “CSV UTF-8” and upload it again' }],
    };
  }

  // Lines are counted from the parser's cursor, so quoted line breaks keep the numbers right.
  let line = 1;
  let cursor = 0;
  const advanceTo = (pos: number) => {
    for (; cursor < pos; cursor++) if (input.charCodeAt(cursor) === 10) line++;
  };

  let columns: Partial<Record<RosterField | 'first' | 'last', number>> | null = null;
  let width = 0;
  let headerOk = false;
  const firstLine = new Map<string, number>();
  const firstId = new Map<string, number>();
  let count = 0;

  Papa.parse<string[]>(input, {
    header: false,
    skipEmptyLines: false,
    delimitersToGuess: [',', ';', '\t'],
    step: (result, parser) => {
      const rowLine = line;
      advanceTo(result.meta.cursor);
      const cells = result.data;
      if (cells.every((c) => c.trim() === '')) return;
      if (!columns) {
        columns = {};
        width = cells.length;
        cells.forEach((c, i) => {
          const field = HEADER_ALIASES[normaliseHeader(c)];
          if (field && columns![field] === undefined) columns![field] = i;
        });
        const hasName = columns.name !== undefined || (columns.first !== undefined && columns.last !== undefined);
        const missing = [
          columns.email === undefined ? 'e-mail' : null,
          hasName ? null : 'name',
          columns.studentId === undefined ? 'student id' : null,
        ].filter(Boolean);
        if (missing.length) {
          errors.push({
            line: rowLine,
            message: `missing column ${missing.map((m) => `"${m}"`).join(', ')} in the header (found: ${cells.map((c) => `"${c.trim()}"`).join(', ')})`,
          });
          parser.abort();
          return;
        }
        headerOk = true;
        return;
      }
      count += 1;
      if (count > ROSTER_LIMITS.maxRows) {
        errors.push({ line: rowLine, message: `more than ${ROSTER_LIMITS.maxRows} people: split the roster into several files` });
        parser.abort();
        return;
      }
      for (const e of result.errors) if (e.code !== 'UndetectableDelimiter') errors.push({ line: rowLine, message: `CSV: ${e.message}` });
      const cols = columns as Record<string, number | undefined>;
      const needed = Math.max(...Object.values(cols).filter((v): v is number => v !== undefined)) + 1;
      if (cells.length < needed) {
        const absent = (['email', 'name', 'studentId'] as const).filter((f) => {
          const at = f === 'name' && cols.name === undefined ? Math.max(cols.first!, cols.last!) : cols[f]!;
          return at >= cells.length;
        });
        errors.push({
          line: rowLine,
          message: `missing column ${absent.map((f) => `"${ROSTER_FIELD_WORDS[f]}"`).join(', ')} (the line has ${cells.length} of ${width} fields)`,
        });
        return;
      }
      const cell = (i: number | undefined) => (i === undefined ? '' : (cells[i] ?? ''));
      const raw: Record<RosterField, string> = {
        email: cell(cols.email),
        name: cols.name !== undefined ? cell(cols.name) : `${cell(cols.first).trim()} ${cell(cols.last).trim()}`.trim(),
        studentId: cell(cols.studentId),
      };
      const parsed = rowSchema.safeParse(raw);
      if (!parsed.success) {
        for (const issue of parsed.error.issues) errors.push({ line: rowLine, message: issueMessage(issue, raw) });
        return;
      }
      const r = parsed.data;
      const seenAt = firstLine.get(r.email);
      if (seenAt !== undefined) {
        errors.push({ line: rowLine, message: `duplicate e-mail ${r.email} (first on line ${seenAt})` });
        return;
      }
      const idAt = firstId.get(r.studentId);
      if (idAt !== undefined) {
        errors.push({ line: rowLine, message: `duplicate student id ${r.studentId} (first on line ${idAt})` });
        return;
      }
      firstLine.set(r.email, rowLine);
      firstId.set(r.studentId, rowLine);
      rows.push({ line: rowLine, ...r });
    },
  });

  if (headerOk && rows.length === 0 && errors.length === 0) errors.push({ line: null, message: 'the file has a header but nobody in it' });
  return { rows, errors };
}
