import fs from 'node:fs';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { normaliseHeader, parseRoster, ROSTER_LIMITS } from '#app/lib/roster-csv';

const fixture = (name: string) => fs.readFileSync(path.join('tests/fixtures/roster', name), 'utf8');

describe('parseRoster (the committed fixtures in tests/fixtures/roster)', () => {
  it('reads a plain comma file: header names matched loosely, quoted fields, e-mails lower-cased', () => {
    expect(parseRoster(fixture('good.csv'))).toEqual({
      rows: [
        { line: 2, email: 'ines.vardy@roster.parley.test', name: 'Ines Vardy', studentId: 'RS-2001' },
        { line: 3, email: 'tomas.quill@roster.parley.test', name: 'Quill, Tomas', studentId: 'RS-2002' },
        { line: 4, email: 'kaia.brenner@roster.parley.test', name: 'Kaia Brenner', studentId: 'RS-2003' },
        { line: 5, email: 'otto.lind@roster.parley.test', name: 'Otto Lind', studentId: 'RS-2004' },
      ],
      errors: [],
    });
  });

  it('reads a semicolon file with a byte-order mark, CRLF, other column order and first + last name', () => {
    expect(parseRoster(fixture('good-semicolon-bom.csv'))).toEqual({
      rows: [
        { line: 2, email: 'greta.holm@roster.parley.test', name: 'Greta Holm', studentId: 'RS-3001' },
        { line: 3, email: 'farid.osei@roster.parley.test', name: 'Farid Osei', studentId: 'RS-3002' },
        // line 4 is blank and skipped; the numbers stay the file's own
        { line: 5, email: 'sina.karlsson@roster.parley.test', name: 'Sina Karlsson-Åberg', studentId: 'RS-3003' },
      ],
      errors: [],
    });
  });

  it('reports every kind of bad line with its line number', () => {
    const { rows, errors } = parseRoster(fixture('bad-lines.csv'));
    expect(errors).toEqual([
      { line: 3, message: 'bad e-mail "not-an-email": is not an e-mail address' },
      { line: 4, message: 'duplicate e-mail hugo.marsh@roster.parley.test (first on line 2)' },
      { line: 5, message: 'missing column "student id" (the line has 2 of 3 fields)' },
      { line: 6, message: 'name is empty' },
      { line: 7, message: 'duplicate student id RS-4001 (first on line 2)' },
      { line: 8, message: 'e-mail is empty' },
      { line: 11, message: 'bad e-mail "maria@@roster.parley.test": is not an e-mail address' },
      { line: 12, message: 'student id is empty' },
    ]);
    // the good lines are read too (the preview shows them), but any error blocks the import
    expect(rows.map((r) => r.line)).toEqual([2, 10]);
  });

  it('names the missing header column, an empty file, a header without people and a file not in UTF-8', () => {
    expect(parseRoster(fixture('missing-column.csv')).errors).toEqual([
      { line: 1, message: 'missing column "student id" in the header (found: "Email", "Full name")' },
    ]);
    expect(parseRoster(fixture('empty.csv')).errors).toEqual([{ line: null, message: 'the file is empty' }]);
    expect(parseRoster(fixture('header-only.csv')).errors).toEqual([{ line: null, message: 'the file has a header but nobody in it' }]);
    expect(parseRoster(fixture('not-utf8.csv')).errors).toEqual([
      { line: null, message: 'the file is not UTF-8 text: save it from your spreadsheet as “CSV UTF-8” and upload it again' },
    ]);
  });

  it('stops at the row limit with a clear message', () => {
    const lines = ['email,name,student id'];
    for (let i = 1; i <= ROSTER_LIMITS.maxRows + 1; i++) lines.push(`p${i}@roster.parley.test,Person ${i},ID-${i}`);
    const { errors } = parseRoster(lines.join('\n'));
    expect(errors).toEqual([
      { line: ROSTER_LIMITS.maxRows + 2, message: `more than ${ROSTER_LIMITS.maxRows} people: split the roster into several files` },
    ]);
  });

  it('matches header names loosely', () => {
    expect(['E-mail', 'EMAIL ADDRESS', 'student_id', 'Student No.', 'Full Name'].map(normaliseHeader)).toEqual([
      'email',
      'emailaddress',
      'studentid',
      'studentno',
      'fullname',
    ]);
  });
});
