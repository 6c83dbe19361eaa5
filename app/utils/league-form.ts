// Form fields of the new-league form ↔ the league design schema (app/lib/league-design.ts). Shared
// by the action (server) and the live checks in the browser. Field names are the schema's paths,
// so zod's issue paths land beside the right inputs.
import { z } from 'zod';
import { AXELROD_PAYOFFS, type LeagueDesign, leagueDesignSchema } from '#app/lib/league-design';
import { grimSPE } from '#app/lib/thresholds';
import { type FormSource, formNumber, formText } from '#app/utils/forms';

type Source = FormSource;
const get = formText;
const num = formNumber;

/** What a new league starts from: Axelrod's (1984) payoffs, δ = 0.9, no execution error. */
export const NEW_LEAGUE: LeagueDesign = {
  payoffs: { ...AXELROD_PAYOFFS },
  delta: 0.9,
  epsilon: 0,
  matches: 0,
  generations: 100,
  seed: 1,
};

export const leagueTitleSchema = z
  .string({ error: 'Name the league.' })
  .trim()
  .min(2, 'Name the league (at least 2 characters).')
  .max(120, 'At most 120 characters.');

export function leagueDesignFromForm(f: Source): unknown {
  return {
    payoffs: { R: num(f, 'payoffs.R'), S: num(f, 'payoffs.S'), T: num(f, 'payoffs.T'), P: num(f, 'payoffs.P') },
    delta: num(f, 'delta'),
    epsilon: num(f, 'epsilon'),
    matches: num(f, 'matches'),
    generations: num(f, 'generations'),
    seed: num(f, 'seed'),
  };
}

export type DeadlineRead = { ok: true; deadline: Date | null } | { ok: false; message: string };

/**
 * The deadline field: a `datetime-local` value ("2026-12-03T17:00") in the browser's time zone,
 * whose offset the page sends beside it (`tz`: minutes, as getTimezoneOffset gives; 0 without
 * JavaScript, i.e. UTC). Empty: no deadline (entries until closed).
 */
export function readDeadline(f: Source, now = new Date()): DeadlineRead {
  const raw = get(f, 'deadline') ?? '';
  if (raw === '') return { ok: true, deadline: null };
  const m = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})$/.exec(raw);
  const tz = Number(get(f, 'tz') ?? '0');
  if (!m || !Number.isInteger(tz) || Math.abs(tz) > 14 * 60) return { ok: false, message: 'Give the deadline as a date and a time.' };
  const utc = Date.UTC(+m[1], +m[2] - 1, +m[3], +m[4], +m[5]) + tz * 60_000;
  const d = new Date(utc);
  if (Number.isNaN(d.getTime())) return { ok: false, message: 'Give the deadline as a date and a time.' };
  if (d.getTime() <= now.getTime()) return { ok: false, message: 'The deadline must be in the future.' };
  return { ok: true, deadline: d };
}

export type LeagueFormRead =
  { ok: true; title: string; design: LeagueDesign; deadline: Date | null } | { ok: false; errors: Record<string, string> };

export function readLeagueForm(f: Source, now = new Date()): LeagueFormRead {
  const errors: Record<string, string> = {};
  const title = leagueTitleSchema.safeParse(get(f, 'title') ?? '');
  if (!title.success) errors.title = title.error.issues[0].message;
  const design = leagueDesignSchema.safeParse(leagueDesignFromForm(f));
  if (!design.success)
    for (const issue of design.error.issues) {
      const key = issue.path.join('.') || 'form';
      errors[key] ??= issue.message;
    }
  const deadline = readDeadline(f, now);
  if (!deadline.ok) errors.deadline = deadline.message;
  if (!title.success || !design.success || !deadline.ok) return { ok: false, errors };
  return { ok: true, title: title.data, design: design.data, deadline: deadline.deadline };
}

/**
 * A warning when δ is below the least δ at which mutual cooperation can be sustained at all:
 * grim trigger is an equilibrium iff δ ≥ (T − R)/(T − P) (Friedman 1971), and no strategy pair
 * sustains cooperation below it.
 */
export function deltaWarning(design: { payoffs: { R: number; S: number; T: number; P: number }; delta: number }): string | null {
  const p = design.payoffs;
  if (!(p.T > p.R && p.R > p.P && p.P > p.S)) return null;
  const threshold = grimSPE(p);
  if (design.delta >= threshold) return null;
  return `At δ = ${design.delta} cooperation cannot be sustained in equilibrium: with these payoffs it needs δ ≥ (T − R)/(T − P) = ${threshold.toFixed(3)} (Friedman 1971). The league still runs, but defection pays.`;
}
