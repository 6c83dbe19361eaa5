/**
 * The choice panel in memory: one row per participant × supergame × round, grouped into
 * subjects → supergames → rounds, plus the estimation windows of the literature.
 * Pure: no IO, runs in the browser and in workers.
 */
import type { Action } from './automata';

export interface ChoiceRow {
  session: string;
  treatment: string;
  subject: string;
  partner: string;
  supergame: number;
  round: number;
  action: Action;
  partnerAction: Action;
  /** 1-based line of the source file (header = line 1), for error messages */
  line?: number;
}

/** One subject's play in one supergame; index t is round t + 1. */
export interface SubjectSupergame {
  supergame: number;
  own: Action[];
  partner: Action[];
}

export interface SubjectHistory {
  session: string;
  treatment: string;
  subject: string;
  /** sorted by supergame number */
  supergames: SubjectSupergame[];
}

/** One termination draw sequence per session: every pair of a session-supergame has this length. */
export interface SessionSupergame {
  session: string;
  treatment: string;
  supergame: number;
  /** supergame length = the largest round observed in this session-supergame */
  length: number;
  /** rounds of the session played before this supergame began (sum of earlier lengths) */
  start: number;
}

export interface Panel {
  /** sorted by session, then subject */
  subjects: SubjectHistory[];
  /** sorted by session, then supergame */
  supergames: SessionSupergame[];
}

export interface PanelIssue {
  /** line of the source file when known */
  line: number | null;
  message: string;
}

export interface BuiltPanel {
  panel: Panel;
  /** a non-empty list means the panel must not be used */
  errors: PanelIssue[];
  /** usable, but worth showing (e.g. a session with a gap in its supergame numbers) */
  warnings: PanelIssue[];
}

const SEP = '\u0000';
const byText = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);

/**
 * Groups rows into subjects → supergames → rounds and checks completeness: within every
 * subject-supergame the rounds must be exactly 1..L, each once; a session has one treatment.
 * Subjects are identified by (session, subject), since pseudonyms are per session.
 */
export function buildPanel(rows: readonly ChoiceRow[], opts: { shorterSupergames?: 'warn' | 'expected' } = {}): BuiltPanel {
  const errors: PanelIssue[] = [];
  const warnings: PanelIssue[] = [];
  const lineOf = (r: ChoiceRow) => r.line ?? null;

  const treatmentOf = new Map<string, { treatment: string; line: number | null }>();
  // session → subject → supergame → round → row
  const cells = new Map<string, Map<string, Map<number, Map<number, ChoiceRow>>>>();
  const lengths = new Map<string, number>();

  for (const r of rows) {
    if (!Number.isInteger(r.supergame) || r.supergame < 1 || !Number.isInteger(r.round) || r.round < 1) {
      errors.push({ line: lineOf(r), message: `supergame and round must be integers ≥ 1 (got ${r.supergame}, ${r.round})` });
      continue;
    }
    const t = treatmentOf.get(r.session);
    if (!t) treatmentOf.set(r.session, { treatment: r.treatment, line: lineOf(r) });
    else if (t.treatment !== r.treatment) {
      errors.push({
        line: lineOf(r),
        message: `session ${r.session} has treatment "${r.treatment}" here but "${t.treatment}" earlier${t.line ? ` (line ${t.line})` : ''}`,
      });
      continue;
    }
    let bySubject = cells.get(r.session);
    if (!bySubject) cells.set(r.session, (bySubject = new Map()));
    let bySupergame = bySubject.get(r.subject);
    if (!bySupergame) bySubject.set(r.subject, (bySupergame = new Map()));
    let byRound = bySupergame.get(r.supergame);
    if (!byRound) bySupergame.set(r.supergame, (byRound = new Map()));
    const seen = byRound.get(r.round);
    if (seen) {
      errors.push({
        line: lineOf(r),
        message: `duplicate row for session ${r.session}, subject ${r.subject}, supergame ${r.supergame}, round ${r.round}${seen.line ? ` (first at line ${seen.line})` : ''}`,
      });
      continue;
    }
    byRound.set(r.round, r);
    const key = r.session + SEP + r.supergame;
    lengths.set(key, Math.max(lengths.get(key) ?? 0, r.round));
  }

  const subjects: SubjectHistory[] = [];
  for (const session of [...cells.keys()].sort(byText)) {
    const bySubject = cells.get(session)!;
    const treatment = treatmentOf.get(session)!.treatment;
    for (const subject of [...bySubject.keys()].sort(byText)) {
      const bySupergame = bySubject.get(subject)!;
      const supergames: SubjectSupergame[] = [];
      for (const supergame of [...bySupergame.keys()].sort((a, b) => a - b)) {
        const byRound = bySupergame.get(supergame)!;
        const rounds = [...byRound.keys()].sort((a, b) => a - b);
        const gap = rounds.findIndex((r, i) => r !== i + 1);
        if (gap >= 0) {
          const after = byRound.get(rounds[gap])!;
          errors.push({
            line: lineOf(after),
            message: `session ${session}, subject ${subject}, supergame ${supergame}: round ${gap + 1} is missing (rounds must run 1..L without gaps; next present is round ${rounds[gap]})`,
          });
          continue;
        }
        const sessionLength = lengths.get(session + SEP + supergame)!;
        // 'expected': Parley's own sessions cut a supergame at a choice that is not the
        // participant's own (app/lib/choice-panel.ts), which is counted and said elsewhere
        if (rounds.length !== sessionLength && opts.shorterSupergames !== 'expected')
          warnings.push({
            line: lineOf(byRound.get(rounds[rounds.length - 1])!),
            message: `session ${session}, subject ${subject}, supergame ${supergame}: ${rounds.length} rounds, but the supergame lasted ${sessionLength} for others in the session`,
          });
        supergames.push({
          supergame,
          own: rounds.map((r) => byRound.get(r)!.action),
          partner: rounds.map((r) => byRound.get(r)!.partnerAction),
        });
      }
      subjects.push({ session, treatment, subject, supergames });
    }
  }

  const supergames: SessionSupergame[] = [];
  for (const session of [...cells.keys()].sort(byText)) {
    const treatment = treatmentOf.get(session)!.treatment;
    const numbers = [...lengths.keys()]
      .filter((k) => k.slice(0, k.indexOf(SEP)) === session)
      .map((k) => Number(k.slice(k.indexOf(SEP) + 1)))
      .sort((a, b) => a - b);
    let start = 0;
    numbers.forEach((supergame, i) => {
      if (i > 0 && supergame !== numbers[i - 1] + 1)
        warnings.push({
          line: null,
          message: `session ${session} has no rows for supergame(s) ${numbers[i - 1] + 1}..${supergame - 1}; rounds before later supergames are counted without them`,
        });
      const length = lengths.get(session + SEP + supergame)!;
      supergames.push({ session, treatment, supergame, length, start });
      start += length;
    });
  }

  return { panel: { subjects, supergames }, errors, warnings };
}

/** Which supergames of each session enter an estimation. */
export type Window =
  | { kind: 'all' }
  /** supergame numbers from..to, inclusive */
  | { kind: 'supergames'; from: number; to: number }
  /** the last n supergames of each session */
  | { kind: 'last'; n: number }
  /**
   * supergames that start after `rounds` rounds of the session have been played (rounds counted
   * across supergames). Dal Bó & Fréchette (2011) use 110. A supergame qualifies when the rounds
   * of the session's earlier supergames sum to ≥ `rounds`: with 110 this reproduces the paper's
   * N = 44 and 832 choices for D5R32 and 1,396 choices for D75R48 (checked in panel-real.test.ts;
   * the strict "> 110" gives other counts).
   */
  | { kind: 'after-rounds'; rounds: number };

/** Parses `all`, `after-rounds:110`, `last:10`, `supergames:5-20` (the CLI's and the app's syntax). */
export function parseWindow(text: string): Window {
  const s = text.trim();
  if (s === 'all') return { kind: 'all' };
  let m = /^after-rounds:(\d+)$/.exec(s);
  if (m) return { kind: 'after-rounds', rounds: Number(m[1]) };
  m = /^last:(\d+)$/.exec(s);
  if (m && Number(m[1]) >= 1) return { kind: 'last', n: Number(m[1]) };
  m = /^supergames:(\d+)-(\d+)$/.exec(s);
  if (m && Number(m[1]) >= 1 && Number(m[2]) >= Number(m[1])) return { kind: 'supergames', from: Number(m[1]), to: Number(m[2]) };
  throw new Error(`Unknown window "${text}": use all, after-rounds:R, last:N or supergames:FROM-TO`);
}

/** The session-supergames a window keeps. */
export function windowSupergames(panel: Panel, window: Window): SessionSupergame[] {
  switch (window.kind) {
    case 'all':
      return panel.supergames.slice();
    case 'supergames':
      return panel.supergames.filter((g) => g.supergame >= window.from && g.supergame <= window.to);
    case 'after-rounds':
      return panel.supergames.filter((g) => g.start >= window.rounds);
    case 'last': {
      const kept: SessionSupergame[] = [];
      for (const session of new Set(panel.supergames.map((g) => g.session))) {
        const own = panel.supergames.filter((g) => g.session === session);
        kept.push(...own.slice(Math.max(0, own.length - window.n)));
      }
      return kept;
    }
  }
}

/** The panel restricted to a window; subjects left with no supergame are dropped. */
export function selectWindow(panel: Panel, window: Window): Panel {
  const supergames = windowSupergames(panel, window);
  const keep = new Set(supergames.map((g) => g.session + SEP + g.supergame));
  const subjects: SubjectHistory[] = [];
  for (const s of panel.subjects) {
    const kept = s.supergames.filter((g) => keep.has(s.session + SEP + g.supergame));
    if (kept.length > 0) subjects.push({ ...s, supergames: kept });
  }
  return { subjects, supergames };
}

export type GroupBy = 'treatment' | 'session' | 'none';

/** Splits a panel into groups estimated separately (SFEM is run per treatment in the literature). */
export function groupPanel(panel: Panel, by: GroupBy): { group: string; panel: Panel }[] {
  if (by === 'none') return [{ group: 'all', panel }];
  const names = [...new Set(panel.subjects.map((s) => s[by]).concat(panel.supergames.map((g) => g[by])))].sort(byText);
  return names.map((group) => ({
    group,
    panel: {
      subjects: panel.subjects.filter((s) => s[by] === group),
      supergames: panel.supergames.filter((g) => g[by] === group),
    },
  }));
}

/** Number of choices (subject-rounds) in a panel. */
export function countChoices(panel: Panel): number {
  let n = 0;
  for (const s of panel.subjects) for (const g of s.supergames) n += g.own.length;
  return n;
}
