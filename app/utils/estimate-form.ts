// The estimation request (SFEM on sessions or an uploaded dataset): zod schema, the form's fields
// → request, and the canonical form a stored estimate is keyed by. Shared by the action (server)
// and the Debrief's form (browser), so field names and limits are the same on both sides.
import { z } from 'zod';
import { LIBRARY, STRATEGY_SETS } from '#app/lib/automata';
import { INCLUDES } from '#app/lib/choice-panel';

/** Upper limits that keep one request within a minute on a 2-core machine. */
export const MAX_BOOTSTRAP = 2000;
export const MAX_SESSIONS = 20;

/** Display and storage order: the preset's order first, then the rest of the library. */
export const STRATEGY_ORDER: readonly string[] = [
  ...STRATEGY_SETS.dbf2011,
  ...LIBRARY.map((a) => a.id).filter((id) => !(STRATEGY_SETS.dbf2011 as readonly string[]).includes(id)),
];

export const STRATEGY_PRESETS = {
  dbf2011: { label: 'Dal Bó & Fréchette (2011): ALLD, ALLC, Grim, TFT, WSLS, T2', ids: STRATEGY_SETS.dbf2011 as readonly string[] },
} as const;

const positive = (what: string) =>
  z.coerce
    .number({ error: `${what} must be a whole number` })
    .int(`${what} must be a whole number`)
    .min(1, `${what} must be at least 1`);

export const windowSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('all') }),
  z
    .object({ kind: z.literal('supergames'), from: positive('The first supergame'), to: positive('The last supergame') })
    .refine((w) => w.to >= w.from, { path: ['to'], message: 'The last supergame must not come before the first' }),
  z.object({ kind: z.literal('last'), n: positive('The number of supergames') }),
  z.object({
    kind: z.literal('after-rounds'),
    rounds: z.coerce
      .number({ error: 'Rounds must be a whole number' })
      .int('Rounds must be a whole number')
      .min(0, 'Rounds cannot be negative'),
  }),
]);
export type EstimateWindow = z.output<typeof windowSchema>;

/** The syntax of app/lib/panel.ts parseWindow (the CLI's --window). */
export function windowText(w: EstimateWindow): string {
  switch (w.kind) {
    case 'all':
      return 'all';
    case 'supergames':
      return `supergames:${w.from}-${w.to}`;
    case 'last':
      return `last:${w.n}`;
    case 'after-rounds':
      return `after-rounds:${w.rounds}`;
  }
}

export function windowWords(text: string): string {
  if (text === 'all') return 'all supergames';
  const [kind, v] = text.split(':');
  if (kind === 'supergames') return `supergames ${v.replace('-', '–')}`;
  if (kind === 'last') return `the last ${v} supergame${v === '1' ? '' : 's'} of each session`;
  return `supergames that start after ${v} rounds of the session`;
}

const sourceSchema = z.discriminatedUnion('kind', [
  z.object({
    kind: z.literal('sessions'),
    sessionIds: z
      .array(z.number().int().positive())
      .min(1, 'Choose at least one session')
      .max(MAX_SESSIONS, `At most ${MAX_SESSIONS} sessions at once`),
  }),
  z.object({ kind: z.literal('dataset'), datasetId: z.number().int().positive() }),
]);

export const estimateRequestSchema = z.object({
  source: sourceSchema,
  window: z.string(),
  /**
   * sessions only: own, paid choices (the default) or every origin (the Debrief's switch).
   * Absent on requests stored before choices kept their origin; those used the participants' own
   * and timeout-filled choices.
   */
  include: z.enum(INCLUDES).optional(),
  strategies: z
    .array(z.string().refine((id) => LIBRARY.some((a) => a.id === id), { message: 'Choose strategies from the library' }))
    .min(1, 'Choose at least one strategy')
    .refine((ids) => new Set(ids).size === ids.length, 'A strategy is listed twice'),
  bootstrap: z.number().int().min(0).max(MAX_BOOTSTRAP),
  seed: z
    .number()
    .int()
    .min(0)
    .max(2 ** 31 - 1),
});
export type EstimateRequest = z.output<typeof estimateRequestSchema>;

/** Same data, window, strategy set, B and seed → the same canonical request (and key). */
export function canonicalRequest(r: EstimateRequest): EstimateRequest {
  const source =
    r.source.kind === 'sessions'
      ? { kind: 'sessions' as const, sessionIds: [...new Set(r.source.sessionIds)].sort((a, b) => a - b) }
      : r.source;
  const strategies = [...r.strategies].sort((a, b) => STRATEGY_ORDER.indexOf(a) - STRATEGY_ORDER.indexOf(b));
  const include = r.source.kind === 'sessions' ? { include: r.include ?? ('own' as const) } : {};
  return { source, window: r.window, ...include, strategies, bootstrap: r.bootstrap, seed: r.seed };
}

const formSchema = z.object({
  sessions: z
    .string()
    .optional()
    .transform((s) =>
      (s ?? '')
        .split(',')
        .map((x) => x.trim())
        .filter(Boolean),
    ),
  dataset: z.string().optional(),
  include: z.enum(INCLUDES, { error: 'Choose which choices to use' }).default('own'),
  windowKind: z.enum(['all', 'supergames', 'last', 'after-rounds'], { error: 'Choose which supergames to use' }),
  from: z.string().optional(),
  to: z.string().optional(),
  last: z.string().optional(),
  afterRounds: z.string().optional(),
  preset: z.enum(['dbf2011', 'custom'], { error: 'Choose a strategy set' }),
  strategies: z.array(z.string()),
  bootstrap: z.coerce
    .number({ error: 'B must be a whole number' })
    .int('B must be a whole number')
    .min(0, 'B cannot be negative')
    .max(MAX_BOOTSTRAP, `B is at most ${MAX_BOOTSTRAP} here (the command line has no limit)`),
  seed: z.coerce
    .number({ error: 'The seed must be a whole number' })
    .int('The seed must be a whole number')
    .min(0, 'The seed cannot be negative')
    .max(2 ** 31 - 1, 'The seed must be below 2³¹'),
});

export type EstimateFormResult = { ok: true; request: EstimateRequest } | { ok: false; errors: Record<string, string> };

/** The Debrief's estimation form → a canonical request, or errors keyed by field name. */
export function estimateRequestFromForm(form: FormData): EstimateFormResult {
  const str = (k: string) => {
    const v = form.get(k);
    return typeof v === 'string' ? v.trim() : undefined;
  };
  const parsed = formSchema.safeParse({
    sessions: str('sessions'),
    dataset: str('dataset') || undefined,
    include: str('include') || undefined,
    windowKind: str('windowKind'),
    from: str('from'),
    to: str('to'),
    last: str('last'),
    afterRounds: str('afterRounds'),
    preset: str('preset'),
    strategies: form.getAll('strategy').filter((v): v is string => typeof v === 'string'),
    bootstrap: str('bootstrap') || undefined,
    seed: str('seed') || undefined,
  });
  const errors: Record<string, string> = {};
  if (!parsed.success) {
    for (const issue of parsed.error.issues) errors[String(issue.path[0] ?? 'form')] ??= issue.message;
    return { ok: false, errors };
  }
  const f = parsed.data;
  const rawWindow =
    f.windowKind === 'supergames'
      ? { kind: 'supergames', from: f.from || undefined, to: f.to || undefined }
      : f.windowKind === 'last'
        ? { kind: 'last', n: f.last || undefined }
        : f.windowKind === 'after-rounds'
          ? { kind: 'after-rounds', rounds: f.afterRounds || undefined }
          : { kind: 'all' };
  const w = windowSchema.safeParse(rawWindow);
  if (!w.success) {
    const field: Record<string, string> = { from: 'from', to: 'to', n: 'last', rounds: 'afterRounds' };
    for (const issue of w.error.issues) errors[field[String(issue.path[0])] ?? 'windowKind'] ??= issue.message;
  }
  const strategies = f.preset === 'dbf2011' ? [...STRATEGY_PRESETS.dbf2011.ids] : f.strategies;
  const source =
    f.dataset !== undefined
      ? { kind: 'dataset' as const, datasetId: Number(f.dataset) }
      : { kind: 'sessions' as const, sessionIds: f.sessions.map(Number) };
  const r = estimateRequestSchema.safeParse({
    source,
    window: w.success ? windowText(w.data) : 'all',
    include: source.kind === 'sessions' ? f.include : undefined,
    strategies,
    bootstrap: f.bootstrap,
    seed: f.seed,
  });
  if (!r.success) {
    for (const issue of r.error.issues) {
      const top = String(issue.path[0]);
      errors[top === 'strategies' ? 'strategy' : top === 'source' ? 'form' : top] ??=
        top === 'source' ? 'Choose sessions of this course or a dataset' : issue.message;
    }
  }
  if (Object.keys(errors).length > 0 || !r.success) return { ok: false, errors };
  return { ok: true, request: canonicalRequest(r.data) };
}
