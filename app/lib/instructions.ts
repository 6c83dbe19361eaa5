/**
 * Instructions for participants, generated from a design (product.md "Open and join"): the payoff
 * table, the draw rule in plain words, what happens on a timeout or with an odd head-count, how
 * points turn into credit, and the no-deception statement. Neutral words only: the actions are
 * the design's labels, never "cooperate" or "defect" (common practice: neutral framing).
 */
import type { Design } from './design';
import { drawRule } from './draws';
import { strategyInWords } from './strategy-words';

const num = (x: number) => String(Number(x.toFixed(2)));
/** "an 87.5%", "an 11%", "a 75%": the article as the number is spoken. */
const aPercent = (p: string) => (/^(8|1[18](\D|$))/.test(p) ? `an ${p}%` : `a ${p}%`);

export function generateInstructions(d: Design): string {
  const { R, S, T, P } = d.payoffs;
  const { C: x, D: y } = d.labels;
  const { max, cutoff: cut } = drawRule(d.delta);
  // δ has at most four decimals (the design schema), so this prints e.g. 87.5 exactly.
  const pct = String(Number((d.delta * 100).toFixed(2)));
  const lines: string[] = [];
  lines.push(
    `In this experiment you are paired with another participant. In every round you both choose ${x} or ${y} at the same time, without seeing the other's choice. Your points depend on both choices:`,
    '',
    `• You ${x}, partner ${x}: you get ${num(R)}, your partner gets ${num(R)}.`,
    `• You ${x}, partner ${y}: you get ${num(S)}, your partner gets ${num(T)}.`,
    `• You ${y}, partner ${x}: you get ${num(T)}, your partner gets ${num(S)}.`,
    `• You ${y}, partner ${y}: you get ${num(P)}, your partner gets ${num(P)}.`,
    '',
  );
  if (d.termination.kind === 'standard') {
    lines.push(
      `You play several rounds with the same partner; we call this a supergame. After every round the computer draws a whole number from 1 to ${max}, the same number for everyone in the room, and shows it to you. If it is ${cut} or less, you play another round with the same partner; if it is above ${cut}, the supergame ends. So after every round there is ${aPercent(pct)} chance of another round, whatever happened before: nobody knows in advance how long a supergame lasts.`,
    );
  } else {
    lines.push(
      `You play several rounds with the same partner; we call this a supergame. After every round the computer draws a whole number from 1 to ${max}, the same number for everyone in the room; the supergame really ends with the first draw above ${cut}, so after every round there is ${aPercent(pct)} chance of another round. You play in blocks of ${d.termination.k} rounds and see the draws only at the end of each block: then you learn whether, and in which round, the supergame ended. Rounds played after that round do not count for your points.`,
    );
  }
  lines.push(
    '',
    `There are ${d.supergames} supergame${d.supergames === 1 ? '' : 's'}. Before each new supergame you are paired at random with a new partner, someone you have not been paired with before as long as that is possible. You never learn who your partners are; you see them only as codes such as P-017.`,
    '',
    `You have ${d.roundSeconds} seconds to choose in each round. If you do not choose in time, ${timeoutWords(d)}, and the round is marked as timed out.`,
  );
  if (d.oddCount.kind === 'computer') {
    lines.push(
      '',
      `If the number of participants is odd, one participant in a supergame is paired with a computer partner instead, in turn. The computer partner ${strategyInWords(d.oddCount.strategy, d.labels)}. You are always told when your partner is a computer.`,
    );
  } else {
    lines.push('', 'If the number of participants is odd, one participant sits out each supergame, in turn, and waits for the next one.');
  }
  lines.push('', creditWords(d), '', 'Everything described here is exactly how the experiment works: the chance of another round is the one stated, the points are as shown, and nobody is misled.');
  if (d.consent) lines.push('', 'Before you start you will be asked whether your choices may be used for research. Your answer does not affect your points or your grade.');
  return lines.join('\n');
}

function timeoutWords(d: Design): string {
  switch (d.timeout) {
    case 'defect':
      return `${d.labels.D} is chosen for you`;
    case 'cooperate':
      return `${d.labels.C} is chosen for you`;
    case 'repeat-last':
      return `your choice of the round before is repeated (${d.labels.C} in a supergame's first round)`;
    case 'computer-strategy':
      return d.oddCount.kind === 'computer'
        ? `the choice is made for you by the rule the computer partner follows`
        : `${d.labels.D} is chosen for you`;
  }
}

function creditWords(d: Design): string {
  const c = d.credit;
  if (c.kind === 'paid') {
    return `You are paid a show-up fee of ${num(c.showUpFee)} ${c.currency} plus ${c.ratePerPoint} ${c.currency} for every point you earn in all rounds that count.`;
  }
  if (c.pointsScaleMax) {
    return `Your points from all rounds that count turn into course credit: ${num(c.pointsScaleMax)} points or more earn the full ${num(c.credit)} credit, fewer earn a proportional share.`;
  }
  return `Taking part earns ${num(c.credit)} course credit, whatever your points.`;
}
