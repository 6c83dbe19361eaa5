/**
 * The comprehension check (product.md, "Comprehension check"): a few questions generated from the
 * design — the payoff table read from both sides and the draw rule — that a participant answers
 * correctly before entering the lobby. A wrong answer is explained and may be tried again.
 * Neutral words only (the design's labels). Pure: the server grades, the page shows.
 */
import type { Design } from './design';
import { drawRule } from './draws';
import { placeholderValues } from './instructions';

export interface QuestionOption {
  value: string;
  label: string;
}

export interface Question {
  /** stable: stored with the attempts so the Conductor can say which question holds someone up */
  id: 'points-dc' | 'points-cd' | 'draw';
  /** a few words for the Conductor */
  topic: string;
  text: string;
  options: QuestionOption[];
  answer: string;
  /** shown after a wrong answer: where the answer comes from */
  explanation: string;
}

const points = (x: number) => String(Number(x.toFixed(2)));

export function comprehensionQuestions(d: Design): Question[] {
  const { R, S, T, P } = d.payoffs;
  const { C: x, D: y } = d.labels;
  const v = placeholderValues(d);
  const { max, cutoff } = drawRule(d.delta);
  // T > R > P > S (the design schema), so the four values are distinct; shown in ascending order.
  const pointOptions = [S, P, R, T].map((n) => ({ value: points(n), label: `${points(n)} points` }));
  const chance = v['delta%']!;
  const drawOptions: QuestionOption[] = [];
  const add = (value: string, label: string) => {
    if (!drawOptions.some((o) => o.label === label)) drawOptions.push({ value, label });
  };
  add('delta', chance);
  // At δ = 0.5 the chance of ending reads the same as δ: then it is offered once, as the answer.
  add('end', v['end%']!);
  add('always', '100%: the supergame always goes on for a fixed number of rounds');
  add('choices', 'It depends on what you and your partner chose');
  return [
    {
      id: 'points-dc',
      topic: 'points table',
      text: `If you choose ${y} and your partner chooses ${x}, how many points do you get in that round?`,
      options: pointOptions,
      answer: points(T),
      explanation: `In the table, your row ${y} and your partner’s column ${x} show “you ${points(T)}, partner ${points(S)}”: you get ${points(T)} points.`,
    },
    {
      id: 'points-cd',
      topic: 'points table',
      text: `If you choose ${x} and your partner chooses ${y}, how many points do you get in that round?`,
      options: pointOptions,
      answer: points(S),
      explanation: `In the table, your row ${x} and your partner’s column ${y} show “you ${points(S)}, partner ${points(T)}”: you get ${points(S)} points.`,
    },
    {
      id: 'draw',
      topic: 'draw rule',
      text: 'After a round, how likely is it that another round with the same partner follows?',
      options: [...drawOptions].sort((a, b) => a.label.localeCompare(b.label, 'en', { numeric: true })),
      answer: 'delta',
      explanation: `After every round a whole number from 1 to ${max} is drawn for the whole room. ${cutoff} or less means another round, so the chance is ${chance}, whatever anyone chose; a number above ${cutoff} ends the supergame.`,
    },
  ];
}

export interface Grade {
  passed: boolean;
  /** ids of the questions answered wrongly or not at all */
  wrong: Question['id'][];
}

export function gradeAnswers(questions: readonly Question[], answers: Readonly<Record<string, unknown>>): Grade {
  const wrong = questions.filter((q) => answers[q.id] !== q.answer).map((q) => q.id);
  return { passed: wrong.length === 0, wrong };
}
