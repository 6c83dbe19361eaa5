/**
 * Instructions for participants, generated from a design (product.md "Open and join"): the payoff
 * table, the draw rule in plain words, what happens on a timeout or with an odd head-count, how
 * points turn into credit, and the no-deception statement. Neutral words only: the actions are
 * the design's labels, never "cooperate" or "defect" (common practice: neutral framing).
 */
import type { Design } from './design';
import { drawRule } from './draws';
import { profilePoints } from './stage-game';
import { strategyInWords } from './strategy-words';

const num = (x: number) => String(Number(x.toFixed(2)));
/** δ as people read a chance: 0.875 → "87.5%" (δ has at most four decimals, so this is exact). */
const percent = (x: number) => `${String(Number((x * 100).toFixed(2)))}%`;

/**
 * The placeholders an instructor may write in the instructions, each filled from the design when
 * a participant reads them, so the numbers follow the parameters. One syntax: the name in curly
 * braces, e.g. {delta%}. The editor lists them (PLACEHOLDER_HELP) and refuses unknown names.
 */
export const PLACEHOLDERS = [
  'R',
  'S',
  'T',
  'P',
  'C',
  'D',
  'delta',
  'delta%',
  'end%',
  'drawMax',
  'drawCutoff',
  'supergames',
  'seconds',
  'blockRounds',
  'credit',
  'fullCreditPoints',
  'showUpFee',
  'ratePerPoint',
  'currency',
] as const;
export type Placeholder = (typeof PLACEHOLDERS)[number];

/** What each placeholder stands for, as the design editor shows it. */
export const PLACEHOLDER_HELP: Record<Placeholder, string> = {
  R: 'points when both choose the first action',
  S: 'points for choosing the first action while the partner chooses the second',
  T: 'points for choosing the second action while the partner chooses the first',
  P: 'points when both choose the second action',
  C: 'the label of the first action',
  D: 'the label of the second action',
  delta: 'δ as a number, e.g. 0.75',
  'delta%': 'the chance of another round, e.g. 75%',
  'end%': 'the chance that a supergame ends after a round, e.g. 25%',
  drawMax: 'the largest number the draw can give (100, 1000 or 10000)',
  drawCutoff: 'the largest draw that continues the supergame',
  supergames: 'the number of supergames',
  seconds: 'the round timer in seconds',
  blockRounds: 'rounds per block (block termination only)',
  credit: 'the course credit for taking part (course credit only)',
  fullCreditPoints: 'the points that earn the full credit (course credit with a points scale only)',
  showUpFee: 'the show-up fee (paid sessions only)',
  ratePerPoint: 'the money per point (paid sessions only)',
  currency: 'the currency code (paid sessions only)',
};

/** Each placeholder's text for this design; undefined where the design has no such number. */
export function placeholderValues(d: Design): Record<Placeholder, string | undefined> {
  const { max, cutoff } = drawRule(d.delta);
  const c = d.credit;
  return {
    R: num(d.payoffs.R),
    S: num(d.payoffs.S),
    T: num(d.payoffs.T),
    P: num(d.payoffs.P),
    C: d.labels.C,
    D: d.labels.D,
    delta: String(d.delta),
    'delta%': percent(d.delta),
    // 1 − δ in ten-thousandths, so 1 − 0.7 prints 30%, not 30.000000000000004%
    'end%': percent((10_000 - Math.round(d.delta * 10_000)) / 10_000),
    drawMax: String(max),
    drawCutoff: String(cutoff),
    supergames: String(d.supergames),
    seconds: String(d.roundSeconds),
    blockRounds: d.termination.kind === 'block' ? String(d.termination.k) : undefined,
    credit: c.kind === 'participation' ? num(c.credit) : undefined,
    fullCreditPoints: c.kind === 'participation' && c.pointsScaleMax ? num(c.pointsScaleMax) : undefined,
    showUpFee: c.kind === 'paid' ? num(c.showUpFee) : undefined,
    ratePerPoint: c.kind === 'paid' ? String(c.ratePerPoint) : undefined,
    currency: c.kind === 'paid' ? c.currency : undefined,
  };
}

const PLACEHOLDER_RE = /\{([A-Za-z%]+)\}/g;

/** The instructions a participant reads: the design's text (or the generated one) with every placeholder filled. */
export function fillInstructions(d: Design, text: string = d.instructions.trim() ? d.instructions : instructionsTemplate(d)): string {
  const values = placeholderValues(d);
  // An unknown or empty placeholder stays as written: the editor refuses it, and opening a session too.
  return text.replace(PLACEHOLDER_RE, (whole, name: string) => (name in values ? (values[name as Placeholder] ?? whole) : whole));
}

/** Placeholders in a text that are unknown, or have no value for this design, each with the reason. */
export function placeholderProblems(d: Design, text: string): string[] {
  const values = placeholderValues(d);
  const out = new Set<string>();
  for (const [, name] of text.matchAll(PLACEHOLDER_RE)) {
    if (!(name in values)) out.add(`{${name}} is not a placeholder Parley knows; the list is under the text box.`);
    else if (values[name as Placeholder] === undefined)
      out.add(`{${name}} has no value in this design (${PLACEHOLDER_HELP[name as Placeholder]}).`);
  }
  return [...out];
}

/**
 * The instructions as a template: the generated text with every number and label written as its
 * placeholder, so an instructor who edits the words keeps numbers that follow the parameters.
 */
export function instructionsTemplate(d: Design): string {
  return compose(d, (k) => `{${k}}`);
}

/** The instructions generated from the design, numbers filled in. */
export function generateInstructions(d: Design): string {
  const values = placeholderValues(d);
  return compose(d, (k) => values[k] ?? '');
}

function compose(d: Design, v: (k: Placeholder) => string): string {
  const x = v('C');
  const y = v('D');
  const lines: string[] = [];
  lines.push(
    `In this experiment you are paired with another participant. In every round you both choose ${x} or ${y} at the same time, without seeing the other's choice. Your points depend on both choices:`,
    '',
    `• You ${x}, partner ${x}: you get ${v('R')}, your partner gets ${v('R')}.`,
    `• You ${x}, partner ${y}: you get ${v('S')}, your partner gets ${v('T')}.`,
    `• You ${y}, partner ${x}: you get ${v('T')}, your partner gets ${v('S')}.`,
    `• You ${y}, partner ${y}: you get ${v('P')}, your partner gets ${v('P')}.`,
    '',
  );
  if (d.termination.kind === 'standard') {
    lines.push(
      `You play several rounds with the same partner; we call this a supergame. After every round the computer draws a whole number from 1 to ${v('drawMax')}, the same number for everyone in the room, and shows it to you. If it is ${v('drawCutoff')} or less, you play another round with the same partner; if it is above ${v('drawCutoff')}, the supergame ends. So after every round the chance of another round is ${v('delta%')}, whatever happened before: nobody knows in advance how long a supergame lasts.`,
    );
  } else {
    lines.push(
      `You play several rounds with the same partner; we call this a supergame. After every round the computer draws a whole number from 1 to ${v('drawMax')}, the same number for everyone in the room; the supergame really ends with the first draw above ${v('drawCutoff')}, so after every round the chance of another round is ${v('delta%')}. You play in blocks of ${v('blockRounds')} rounds and see the draws only at the end of each block: then you learn whether, and in which round, the supergame ended. Rounds played after that round do not count for your points.`,
    );
  }
  lines.push(
    '',
    `There ${d.supergames === 1 ? 'is' : 'are'} ${v('supergames')} supergame${d.supergames === 1 ? '' : 's'}. Before each new supergame you are paired at random with a new partner, someone you have not been paired with before as long as that is possible. You never learn who your partners are; you see them only as codes such as P-017.`,
    '',
    `You have ${v('seconds')} seconds to choose in each round. If you do not choose in time, ${timeoutWords(d, x, y)}, and the round is marked as timed out.`,
  );
  if (d.oddCount.kind === 'computer') {
    lines.push(
      '',
      `If the number of participants is odd, one participant in a supergame is paired with a computer partner instead, in turn. The computer partner ${strategyInWords(d.oddCount.strategy, { C: x, D: y })}. You are always told when your partner is a computer.`,
    );
  } else {
    lines.push('', 'If the number of participants is odd, one participant sits out each supergame, in turn, and waits for the next one.');
  }
  lines.push(
    '',
    creditWords(d, v),
    '',
    'Everything described here is exactly how the experiment works: the chance of another round is the one stated, the points are as shown, and nobody is misled.',
  );
  if (d.consent)
    lines.push(
      '',
      'Before you start you will be asked whether your choices may be used for research. Your answer does not affect your points or your grade.',
    );
  return lines.join('\n');
}

function timeoutWords(d: Design, x: string, y: string): string {
  switch (d.timeout) {
    case 'defect':
      return `${y} is chosen for you`;
    case 'cooperate':
      return `${x} is chosen for you`;
    case 'repeat-last':
      return `your choice of the round before is repeated (${x} in a supergame's first round)`;
    case 'computer-strategy':
      return d.oddCount.kind === 'computer'
        ? `the choice is made for you by the rule the computer partner follows`
        : `${y} is chosen for you`;
  }
}

function creditWords(d: Design, v: (k: Placeholder) => string): string {
  const c = d.credit;
  if (c.kind === 'paid') {
    return `You are paid a show-up fee of ${v('showUpFee')} ${v('currency')} plus ${v('ratePerPoint')} ${v('currency')} for every point you earn in all rounds that count.`;
  }
  if (c.pointsScaleMax) {
    return `Your points from all rounds that count turn into course credit: ${v('fullCreditPoints')} points or more earn the full ${v('credit')} credit, fewer earn a proportional share.`;
  }
  return `Taking part earns ${v('credit')} course credit, whatever your points.`;
}

/** Words that make a percentage in the same sentence a chance of another round (or of the end). */
const CHANCE_WORDS = /\b(chances?|probab\w*|likel\w*|another round|continu\w*|go(?:es)? on|end(?:s|ed|ing)?|stops?|δ|delta)\b|δ/i;

/** The sentence of `text` that holds [index, index + length): from the last sentence end before it to the next after it. */
function sentenceAround(text: string, index: number, length: number): string {
  const before = text.slice(0, index);
  const ends = [...before.matchAll(/[.!?](?=\s)|\n/g)];
  const start = ends.length ? ends[ends.length - 1].index + 1 : 0;
  const after = text.slice(index + length).search(/[.!?](?=\s|$)|\n/);
  return text.slice(start, after < 0 ? undefined : index + length + after);
}

/** A number as written in text: "0,75" and "−5" read as 0.75 and -5. */
const readNumber = (s: string) => Number(s.replace(',', '.').replace('−', '-'));
const same = (a: number, b: number) => Math.abs(a - b) < 1e-9;

/**
 * Where the instructions a participant would read say something the design does not do: a chance
 * of another round other than δ (or of ending other than 1 − δ), another draw range or cut-off,
 * other points in a "You X, partner Y: you get …" line, another number of supergames or seconds.
 * Hand-written numbers are what goes stale when δ or the payoffs change ("75 %" kept while δ = 0.5);
 * placeholders cannot. Each message names what the text says, what the design does, and the fix.
 */
export function instructionContradictions(d: Design, text: string = fillInstructions(d)): string[] {
  const out: string[] = [];
  const v = placeholderValues(d);
  const { max, cutoff } = drawRule(d.delta);
  const deltaPct = d.delta * 100;
  const endPct = 100 - deltaPct;
  for (const m of text.matchAll(/(\d+(?:[.,]\d+)?)\s?(%|per ?cent\b)/gi)) {
    const p = readNumber(m[1]);
    // Only a percentage in a sentence about going on or ending is a chance of another round;
    // "you keep 100% of your points" is not.
    if (!CHANCE_WORDS.test(sentenceAround(text, m.index, m[0].length))) continue;
    if (!same(p, deltaPct) && !same(p, endPct)) {
      out.push(
        `The instructions say “${m[0]}”, but δ = ${d.delta}: the chance of another round is ${v['delta%']} (and of the supergame ending ${v['end%']}). Write {delta%} or {end%} so the number follows δ.`,
      );
    }
  }
  for (const m of text.matchAll(/(?:δ|delta|probability(?: of| is)?|chance(?: of| is)?)\s*(?:=|is|of)?\s*(0?[.,]\d+)(?!\s?%)/gi)) {
    const p = readNumber(m[1]);
    if (!same(p, d.delta) && !same(p, 1 - d.delta))
      out.push(`The instructions say “${m[0]}”, but δ = ${d.delta}. Write {delta} so the number follows δ.`);
  }
  for (const m of text.matchAll(/\bfrom 1 to (\d[\d,]*)/gi)) {
    if (readNumber(m[1].replace(/,/g, '')) !== max)
      out.push(`The instructions say the draw runs “${m[0]}”, but with δ = ${d.delta} it runs from 1 to ${max}. Write {drawMax}.`);
  }
  for (const m of text.matchAll(/\b(\d+) or less\b|\bdraw (?:is )?above (\d+)|\bif it is above (\d+)/gi)) {
    const n = Number(m[1] ?? m[2] ?? m[3]);
    if (n !== cutoff)
      out.push(
        `The instructions say “${m[0]}”, but with δ = ${d.delta} the supergame goes on while the draw is ${cutoff} or less. Write {drawCutoff}.`,
      );
  }
  const escape = (s: string) => s.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
  const label = `(${escape(d.labels.C)}|${escape(d.labels.D)})`;
  const pay = new RegExp(`You ${label}, partner ${label}: you get (−?-?\\d+(?:[.,]\\d+)?), your partner gets (−?-?\\d+(?:[.,]\\d+)?)`, 'g');
  const actionOf = (l: string) => (l === d.labels.C ? 'C' : 'D');
  for (const m of text.matchAll(pay)) {
    const [own, partner] = profilePoints(d.payoffs, actionOf(m[1]), actionOf(m[2]));
    if (!same(readNumber(m[3]), own) || !same(readNumber(m[4]), partner)) {
      out.push(
        `The instructions say “${m[0]}”, but the payoffs give you ${num(own)} and your partner ${num(partner)}. Write the points as {R}, {S}, {T} and {P}.`,
      );
    }
  }
  for (const m of text.matchAll(/\bThere (?:are|is) (\d+) supergames?/gi)) {
    if (Number(m[1]) !== d.supergames) out.push(`The instructions say “${m[0]}”, but the design has ${d.supergames}. Write {supergames}.`);
  }
  for (const m of text.matchAll(/\b(\d+) seconds to choose/gi)) {
    if (Number(m[1]) !== d.roundSeconds)
      out.push(`The instructions say “${m[0]}”, but the round timer is ${d.roundSeconds} seconds. Write {seconds}.`);
  }
  return out;
}

/** Everything that keeps these instructions from being shown: unknown placeholders, then contradictions. */
export function instructionProblems(d: Design): string[] {
  const text = d.instructions.trim() ? d.instructions : instructionsTemplate(d);
  return [...placeholderProblems(d, text), ...instructionContradictions(d, fillInstructions(d, text))];
}

/**
 * The few lines a phone shows above everything else on the instructions page: the game, the draw,
 * the length of play, credit, and what comes before the lobby. The full instructions follow.
 */
export function instructionSummary(d: Design): string[] {
  const v = placeholderValues(d);
  // Expected supergame length 1/(1 − δ) (common practice: the mean of the geometric length).
  const mean = Number((1 / (1 - d.delta)).toFixed(1));
  const c = d.credit;
  const out = [
    `You and a partner each choose ${d.labels.C} or ${d.labels.D}, at the same time. Your points depend on both choices (the table below).`,
    `After every round a number is drawn for the whole room: the chance of another round with the same partner is ${v['delta%']} — on average ${mean} rounds with one partner.`,
    `${d.supergames} supergame${d.supergames === 1 ? '' : 's'}, a new partner for each; ${d.roundSeconds} seconds to choose in a round.`,
    c.kind === 'paid'
      ? `You are paid ${num(c.showUpFee)} ${c.currency} plus ${c.ratePerPoint} ${c.currency} a point.`
      : c.pointsScaleMax
        ? `Your points turn into up to ${num(c.credit)} course credit.`
        : `Taking part earns ${num(c.credit)} course credit.`,
  ];
  const before = [
    d.comprehension ? 'three questions check that the rules are clear' : null,
    d.practice ? 'you can practise against the computer (not recorded)' : null,
  ].filter(Boolean);
  if (before.length) out.push(`Before the game ${before.join(', then ')}.`);
  return out;
}

/** The payoff table as a phone shows it (components/live/payoff-table.tsx): your choice, the partner's, both points. */
export function payoffRows(p: Design['payoffs']) {
  const { R, S, T, P } = p;
  return [
    { own: 'C' as const, partner: 'C' as const, ownPoints: R, partnerPoints: R },
    { own: 'C' as const, partner: 'D' as const, ownPoints: S, partnerPoints: T },
    { own: 'D' as const, partner: 'C' as const, ownPoints: T, partnerPoints: S },
    { own: 'D' as const, partner: 'D' as const, ownPoints: P, partnerPoints: P },
  ];
}
