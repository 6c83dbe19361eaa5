import { type ComponentProps, Fragment, type ReactNode, useId } from 'react';
import { Form, Link } from 'react-router';

export function cx(...parts: (string | false | null | undefined)[]) {
  return parts.filter(Boolean).join(' ');
}

const buttonStyles = {
  primary: 'bg-accent-700 text-white hover:bg-accent-800 disabled:bg-slate-400',
  secondary: 'bg-white text-slate-800 ring-1 ring-slate-300 hover:bg-slate-100',
  danger: 'bg-white text-danger-600 ring-1 ring-danger-600/40 hover:bg-danger-50',
  quiet: 'text-accent-700 hover:bg-accent-50',
};

/** A link that looks like a button (for navigation; actions use Button in a form). */
export function ButtonLink({
  variant = 'primary',
  className,
  ...props
}: ComponentProps<typeof Link> & { variant?: keyof typeof buttonStyles }) {
  return (
    <Link
      {...props}
      className={cx(
        'inline-flex min-h-11 items-center justify-center gap-2 rounded-lg px-4 py-2 font-semibold',
        buttonStyles[variant],
        className,
      )}
    />
  );
}

export function Button({ variant = 'primary', className, ...props }: ComponentProps<'button'> & { variant?: keyof typeof buttonStyles }) {
  return (
    <button
      {...props}
      className={cx(
        'inline-flex min-h-11 items-center justify-center gap-2 rounded-lg px-4 py-2 font-semibold transition-colors disabled:cursor-not-allowed',
        buttonStyles[variant],
        className,
      )}
    />
  );
}

/** A labelled input with its error and hint tied to it for screen readers. */
export function TextField({
  label,
  error,
  hint,
  className,
  ...input
}: ComponentProps<'input'> & { label: string; error?: string; hint?: ReactNode }) {
  const id = useId();
  const errId = `${id}-error`;
  const hintId = `${id}-hint`;
  return (
    <div className={cx('flex flex-col gap-1', className)}>
      <label htmlFor={id} className="font-semibold text-slate-800">
        {label}
      </label>
      <input
        id={id}
        aria-invalid={error ? true : undefined}
        aria-describedby={cx(error ? errId : null, hint ? hintId : null) || undefined}
        {...input}
        className={cx(
          'min-h-11 rounded-lg border bg-white px-3 py-2 text-lg text-slate-900 shadow-sm',
          error ? 'border-danger-600' : 'border-slate-300',
        )}
      />
      {hint ? (
        <p id={hintId} className="text-sm text-slate-600">
          {hint}
        </p>
      ) : null}
      {error ? <FieldError id={errId}>{error}</FieldError> : null}
    </div>
  );
}

export function SelectField({
  label,
  error,
  options,
  className,
  ...select
}: ComponentProps<'select'> & { label: string; error?: string; options: readonly { value: string; label: string }[] }) {
  const id = useId();
  return (
    <div className={cx('flex flex-col gap-1', className)}>
      <label htmlFor={id} className="font-semibold text-slate-800">
        {label}
      </label>
      <select
        id={id}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : undefined}
        {...select}
        className="min-h-11 max-w-full rounded-lg border border-slate-300 bg-white px-3 py-2 text-base"
      >
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      {error ? <FieldError id={`${id}-error`}>{error}</FieldError> : null}
    </div>
  );
}

export function FieldError({ id, children }: { id?: string; children: ReactNode }) {
  return (
    <p id={id} className="flex items-start gap-1 text-sm font-semibold text-danger-600">
      <span aria-hidden="true">⚠</span>
      <span>{children}</span>
    </p>
  );
}

/** A notice box; the icon and the heading carry the meaning, never colour alone. */
export function Notice({
  tone = 'info',
  title,
  children,
}: {
  tone?: 'info' | 'warn' | 'error' | 'ok';
  title?: string;
  children: ReactNode;
}) {
  const styles = {
    info: ['border-accent-200 bg-accent-50 text-slate-800', 'ℹ'],
    warn: ['border-amber-300 bg-warn-50 text-slate-900', '⚠'],
    error: ['border-danger-600/40 bg-danger-50 text-slate-900', '✕'],
    ok: ['border-accent-300 bg-white text-slate-900', '✓'],
  } as const;
  const [cls, icon] = styles[tone];
  return (
    <div role={tone === 'error' ? 'alert' : 'status'} className={cx('flex gap-3 rounded-lg border p-4', cls)}>
      <span aria-hidden="true" className="text-lg leading-6 font-bold">
        {icon}
      </span>
      <div className="flex flex-col gap-1">
        {title ? <p className="font-semibold">{title}</p> : null}
        <div>{children}</div>
      </div>
    </div>
  );
}

export function DemoBadge() {
  return (
    <span
      className="inline-flex items-center gap-1 rounded-full border border-slate-300 bg-white px-2 py-0.5 text-xs font-semibold text-slate-700"
      title="Invented demo data"
    >
      <span aria-hidden="true">◇</span> Demo · invented data
    </span>
  );
}

/**
 * A one-button form for a row of a staff table (remove, delete, revoke…): hidden fields, an
 * optional confirmation, and the row's name for screen readers after the visible label.
 */
export function RowAction({
  fields,
  label,
  target,
  confirmText,
  tone = 'danger',
}: {
  fields: Record<string, string | number>;
  label: string;
  /** what the row is, read after the label: "Remove ada@…" */
  target: string;
  confirmText?: string;
  tone?: 'danger' | 'quiet';
}) {
  return (
    <Form
      method="post"
      onSubmit={(e) => {
        if (confirmText && !window.confirm(confirmText)) e.preventDefault();
      }}
    >
      {Object.entries(fields).map(([k, v]) => (
        <input key={k} type="hidden" name={k} value={v} />
      ))}
      <button
        type="submit"
        className={cx(
          'min-h-9 rounded px-2 font-semibold',
          tone === 'danger' ? 'text-danger-600 hover:bg-danger-50' : 'text-accent-700 hover:bg-accent-50',
        )}
      >
        {label}
        <span className="sr-only"> {target}</span>
      </button>
    </Form>
  );
}

/**
 * An e-mail address that wraps only before "@" or ".", never inside a word: each piece keeps
 * together and a <wbr> offers the break (CSS break-all split addresses anywhere).
 */
export function EmailAddress({ email, className }: { email: string; className?: string }) {
  return (
    <span className={className}>
      {email.split(/(?=[@.])/).map((piece, i) => (
        <Fragment key={i}>
          {i ? <wbr /> : null}
          <span className="whitespace-nowrap">{piece}</span>
        </Fragment>
      ))}
    </span>
  );
}
