/**
 * A treatment is identified by the frozen parameters that change the game's theory, never by the
 * design's name (docs/decisions/027-treatment-identity.md). Names are free text, need not be
 * unique and say nothing about δ or payoffs; two sessions are the same treatment exactly when
 * their identity keys are equal. Pure: runs on the server and in the browser.
 */
import type { Design } from './design';

/** The fields of a design that make up its treatment (everything else is presentation or logistics). */
export type TreatmentParams = Pick<Design, 'payoffs' | 'delta' | 'termination' | 'matching'>;

export interface Treatment {
  /** stable, exact and comparable: equal keys ⇔ same treatment */
  key: string;
  /** readable, e.g. "R40 S12 T50 P25, δ = 0.75, random termination" */
  label: string;
}

/** Shortest exact text of a number (payoffs may have decimals; δ has at most four). −0 is 0. */
const num = (x: number) => String(x === 0 ? 0 : x);
/** A minus sign, not a hyphen, in labels people read. */
const shown = (x: number) => num(x).replace(/^-/, '−');

function terminationWords(t: TreatmentParams['termination']): string {
  return t.kind === 'block' ? `block random termination, blocks of ${t.k}` : 'random termination';
}

export function treatmentOf(d: TreatmentParams): Treatment {
  const { R, S, T, P } = d.payoffs;
  const term = d.termination.kind === 'block' ? `block:${d.termination.k}` : 'standard';
  return {
    key: `R=${num(R)};S=${num(S)};T=${num(T)};P=${num(P)};delta=${num(d.delta)};termination=${term};matching=${d.matching}`,
    label: `R${shown(R)} S${shown(S)} T${shown(T)} P${shown(P)}, δ = ${num(d.delta)}, ${terminationWords(d.termination)}`,
  };
}

/** The treatment's name in exports for a version of a design: "Baseline", "Baseline (v2)". */
export function versionedName(name: string, version: number): string {
  return version > 1 ? `${name} (v${version})` : name;
}

export interface TreatmentSession {
  id: number;
  /** the name the session carries (the design's name when it opened) */
  name: string;
  design: TreatmentParams;
}

export interface TreatmentGroup extends Treatment {
  /** one string per group, for SFEM groups and table rows: names, then the parameters */
  title: string;
  /** the session names in this group, in session order, each once */
  names: string[];
  sessionIds: number[];
  design: TreatmentParams;
}

export interface TreatmentConflict {
  name: string;
  /** the different treatments sharing that name, each with its sessions */
  variants: { label: string; sessionIds: number[] }[];
}

export type Grouping =
  { ok: true; groups: TreatmentGroup[]; separated: TreatmentConflict[] } | { ok: false; conflicts: TreatmentConflict[]; message: string };

const list = (ids: number[]) => ids.map((id) => `#${id}`).join(', ');

/**
 * Sessions grouped by treatment identity, in order of their first session. Sessions that share a
 * name but differ in payoffs, δ, termination or matching would be pooled by anyone reading the
 * names: that is refused with a message naming the difference, unless `separate` is set (the
 * researcher asked to see them as separate groups), in which case each identity is its own group
 * and the conflicts are returned in `separated` so the page can say so.
 */
export function groupByTreatment(sessions: readonly TreatmentSession[], opts: { separate?: boolean } = {}): Grouping {
  const ordered = [...sessions].sort((a, b) => a.id - b.id);
  const byKey = new Map<string, TreatmentGroup>();
  const keysOfName = new Map<string, Map<string, number[]>>();
  for (const s of ordered) {
    const t = treatmentOf(s.design);
    const g = byKey.get(t.key) ?? { ...t, title: '', names: [], sessionIds: [], design: s.design };
    if (!g.names.includes(s.name)) g.names.push(s.name);
    g.sessionIds.push(s.id);
    byKey.set(t.key, g);
    const variants = keysOfName.get(s.name) ?? new Map<string, number[]>();
    variants.set(t.key, [...(variants.get(t.key) ?? []), s.id]);
    keysOfName.set(s.name, variants);
  }
  const conflicts: TreatmentConflict[] = [];
  for (const [name, variants] of keysOfName) {
    if (variants.size < 2) continue;
    conflicts.push({ name, variants: [...variants].map(([key, ids]) => ({ label: byKey.get(key)!.label, sessionIds: ids })) });
  }
  if (conflicts.length > 0 && !opts.separate) {
    const message = conflicts
      .map(
        (c) =>
          `Sessions called “${c.name}” ran different treatments (${c.variants.map((v) => `${list(v.sessionIds)}: ${v.label}`).join('; ')}), so they cannot be pooled.`,
      )
      .join(' ');
    return { ok: false, conflicts, message };
  }
  const groups = [...byKey.values()].map((g) => ({ ...g, title: `${g.names.join(' / ')} — ${g.label}` }));
  return { ok: true, groups, separated: conflicts };
}

/** Each session's group title when every treatment is its own group (what SFEM groups by). */
export function treatmentTitles(sessions: readonly TreatmentSession[]): Map<number, string> {
  const g = groupByTreatment(sessions, { separate: true });
  const out = new Map<number, string>();
  if (g.ok) for (const group of g.groups) for (const id of group.sessionIds) out.set(id, group.title);
  return out;
}
