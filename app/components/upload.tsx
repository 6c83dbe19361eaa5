// Pieces of the CSV upload pages (roster, choice panels): the file picker and the list of
// problems by line that stops an all-or-nothing import.
import { type ReactNode, useId } from 'react';
import { Notice } from './ui';

export function CsvFileField({ label }: { label: string }) {
  const id = useId();
  return (
    <div className="flex flex-col gap-1">
      <label htmlFor={id} className="font-semibold text-slate-800">
        {label}
      </label>
      <input
        id={id}
        name="file"
        type="file"
        accept=".csv,text/csv"
        required
        className="min-h-11 max-w-full rounded-lg border border-slate-300 bg-white p-2"
      />
    </div>
  );
}

export interface LineIssue {
  line: number | null;
  message: string;
}

/** "N problems in file.csv: nothing was written", then each problem with its line. */
export function LineIssues({
  issues,
  total = issues.length,
  fileName,
  verb,
  children,
}: {
  issues: LineIssue[];
  total?: number;
  fileName: string;
  verb: string;
  children?: ReactNode;
}) {
  return (
    <Notice tone="error" title={`${total} problem${total === 1 ? '' : 's'} in ${fileName || 'the file'}: nothing was ${verb}`}>
      {children}
      <ul className="flex flex-col gap-1" aria-label="Problems by line">
        {issues.map((e, i) => (
          <li key={i}>
            <strong>{e.line === null ? 'File' : `Line ${e.line}`}:</strong> {e.message}
          </li>
        ))}
        {total > issues.length ? <li>… and {total - issues.length} more.</li> : null}
      </ul>
    </Notice>
  );
}
