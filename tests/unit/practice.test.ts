import { describe, expect, it } from 'vitest';
import { libraryStrategy } from '#app/lib/automata';
import { designSchema } from '#app/lib/design';
import { automatonNext, playPracticeRound, PRACTICE_MAX_ROUNDS, type PracticeRound } from '#app/lib/practice';

const d = designSchema.parse({ payoffs: { R: 40, S: 12, T: 50, P: 25 }, delta: 0.75, supergames: 10, roundSeconds: 20 });

describe('the practice supergame', () => {
  it('plays tit-for-tat against the phone: first round C, then what the phone did', () => {
    // Source: Axelrod (1984), tit-for-tat: cooperate first, then copy the partner's last move.
    const tft = libraryStrategy('TFT');
    expect(automatonNext(tft, [], [])).toBe('C');
    expect(automatonNext(tft, ['C'], ['D'])).toBe('D');
    expect(automatonNext(tft, ['C', 'D'], ['D', 'C'])).toBe('C');
  });

  it('scores each round with the design’s payoffs and decides the next by the draw', () => {
    const tft = libraryStrategy('TFT');
    const r1 = playPracticeRound(d, tft, [], 'D', 75);
    // Source: common practice — you D against C: T = 50 for you, S = 12 for the partner; draw 75 ≤ 100·0.75 continues.
    expect(r1).toEqual({ round: 1, own: 'D', computer: 'C', ownPoints: 50, computerPoints: 12, draw: 75, another: true, goesOn: true });
    const r2 = playPracticeRound(d, tft, [r1], 'C', 76);
    expect(r2).toMatchObject({ round: 2, own: 'C', computer: 'D', ownPoints: 12, computerPoints: 50, another: false, goesOn: false });
  });

  it('stops after the cap even when the draws go on', () => {
    const history: PracticeRound[] = [];
    for (let i = 0; i < PRACTICE_MAX_ROUNDS; i++) history.push(playPracticeRound(d, libraryStrategy('ALLC'), history, 'C', 1));
    expect(history.map((r) => r.goesOn)).toEqual([true, true, true, true, false]);
    expect(history.every((r) => r.ownPoints === 40)).toBe(true);
  });
});
