// @vitest-environment happy-dom
import { act, cleanup, fireEvent, render, screen } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import { LeagueReveal, REVEAL_ROWS, revealStep } from '#app/components/big-screen/league-reveal';
import { compactEvolution, sharesInWords } from '#app/components/league-charts';
import { libraryStrategy } from '#app/lib/automata';
import { evolve, roundRobin, standings, survivors } from '#app/lib/league';

afterEach(cleanup);

// A league of four library strategies at Axelrod's payoffs (T 5, R 3, P 1, S 0; Axelrod 1984),
// δ = 0.9, no errors: the numbers come from app/lib/league.ts, which has its own checks.
const IDS = ['ALLD', 'TFT', 'ALLC', 'Grim'];
const AXELROD = { T: 5, R: 3, P: 1, S: 0 };
const perRound = roundRobin(
  IDS.map((id) => libraryStrategy(id)),
  { game: AXELROD, delta: 0.9, epsilon: 0 },
);
const ranked = standings(perRound).map((s) => ({ rank: s.rank, name: IDS[s.entry], score: s.score }));
const evo = evolve(perRound, 50);
const evolution = { names: IDS, shares: evo.shares };
const alive = survivors(evo).map((s) => ({ name: IDS[s.entry], share: s.share }));

const key = (k: string) => act(() => void fireEvent.keyDown(window, { key: k }));
const rows = () => screen.queryAllByTestId('reveal-row').map((r) => r.textContent);

describe('LeagueReveal', () => {
  it('reveals the ranking from the bottom, one entry per key, then the evolution chart', () => {
    render(
      <LeagueReveal
        title="Week 6 league"
        entries={ranked}
        evolution={evolution}
        settings="δ = 0.9, ε = 0"
        background={0}
        survivors={alive}
      />,
    );
    expect(screen.getByRole('heading', { name: 'Week 6 league' })).toBeTruthy();
    expect(rows()).toEqual([]);
    key('ArrowRight');
    // Last place first. Per round at δ = 0.9 [calc, from the stage payoffs]: ALLD earns 1 against
    // itself, 0.1·5 + 0.9·1 = 1.4 against TFT and Grim, 5 against ALLC: mean 2.2. ALLC earns 0, 3,
    // 3, 3: mean 2.25. TFT and Grim earn 0.9, 3, 3, 3: mean 2.475, a shared first place.
    expect(rows()).toHaveLength(1);
    expect(rows()[0]).toContain('ALLD');
    expect(rows()[0]).toContain('2.20');
    expect(screen.getByTestId('reveal-hidden').textContent).toContain('3 entries still to come');
    key('ArrowRight');
    key('PageDown');
    expect(rows()).toHaveLength(3);
    key('ArrowLeft');
    expect(rows()).toHaveLength(2);
    key('ArrowRight');
    key('ArrowRight');
    // All four, best first: TFT and Grim share rank 1 (2.475), ALLC 3rd (2.25), ALLD 4th.
    expect(rows()).toHaveLength(4);
    expect(rows().map((r) => r!.slice(0, 1))).toEqual(['1', '1', '3', '4']);
    expect(rows()[0]).toContain('2.48');
    expect(rows()[2]).toContain('ALLC');
    expect(rows()[3]).toContain('ALLD');
    expect(screen.queryByTestId('reveal-hidden')).toBeNull();
    key('ArrowRight');
    expect(screen.getByTestId('evolution-chart')).toBeTruthy();
    expect(screen.getByText(/background fitness of 0/)).toBeTruthy();
    // ALLD dies out; the three that cooperate with each other remain.
    expect(screen.getByText(/Still there at the end/).textContent).not.toContain('ALLD');
    // No step after the chart.
    key('ArrowRight');
    expect(screen.getByTestId('league-reveal').dataset.step).toBe('5');
  });

  it('the Next and Back buttons step as the keys do', () => {
    render(<LeagueReveal title="L" entries={ranked} evolution={evolution} settings="" background={0} survivors={alive} />);
    const next = screen.getByRole('button', { name: /Next/ });
    fireEvent.click(next);
    fireEvent.click(next);
    expect(rows()).toHaveLength(2);
    fireEvent.click(screen.getByRole('button', { name: /Back/ }));
    expect(rows()).toHaveLength(1);
  });

  it(`shows at most ${REVEAL_ROWS} rows: the latest reveal on top`, () => {
    const many = Array.from({ length: 20 }, (_, k) => ({ rank: k + 1, name: `Entry ${k + 1}`, score: 3 - k / 10 }));
    expect(revealStep(0, 20)).toEqual({ kind: 'title' });
    expect(revealStep(12, 20)).toEqual({ kind: 'ranking', from: 8 });
    expect(revealStep(21, 20)).toEqual({ kind: 'evolution' });
    render(
      <LeagueReveal
        title="L"
        entries={many}
        evolution={{ names: many.map((m) => m.name), shares: [many.map(() => 1 / 20)] }}
        settings=""
        background={0}
        survivors={[]}
      />,
    );
    for (let k = 0; k < 12; k++) key('ArrowRight');
    expect(rows()).toHaveLength(REVEAL_ROWS);
    expect(rows()[0]).toContain('Entry 9');
  });
});

describe('the class slide', () => {
  it('comes after the evolution when the league keeps a session estimate: the mix, and the entries against it', () => {
    const classSlide = {
      session: 'Short horizon, session 1',
      simulated: true,
      subjects: 40,
      errorProbability: 0.055,
      mix: [
        { id: 'ALLD', name: 'Always defect', share: 0.625 },
        { id: 'TFT', name: 'Tit-for-tat', share: 0.314 },
        { id: 'WSLS', name: 'Win-stay, lose-shift', share: 0.001 },
      ],
      entries: [
        { name: 'Grim', value: 1.536 },
        { name: 'ALLD', value: 1.426 },
      ],
      otherGame: 'R 40, S 12, T 50, P 25 and δ = 0.5',
    };
    expect(revealStep(6, 4)).toEqual({ kind: 'class' });
    render(
      <LeagueReveal
        title="L"
        entries={ranked}
        evolution={evolution}
        settings=""
        background={0}
        survivors={alive}
        classSlide={classSlide}
      />,
    );
    for (let k = 0; k < 6; k++) key('ArrowRight');
    const slide = screen.getByTestId('reveal-class');
    expect(slide.textContent).toContain('Always defect');
    expect(slide.textContent).toContain('63 %');
    // Shares under 0.5 % are left out of the projected list.
    expect(slide.textContent).not.toContain('Win-stay');
    expect(slide.textContent).toContain('simulated demo data');
    expect(slide.textContent).toContain('not a count of people');
    expect(slide.textContent).toContain(
      "The session was played at R 40, S 12, T 50, P 25 and δ = 0.5; its strategies are valued here at the league's",
    );
    expect(slide.textContent).toMatch(/1\s*Grim\s*1\.54/);
    expect(screen.getByTestId('reveal-position').textContent).toBe('6 / 6');
  });
});

describe('compact evolution', () => {
  it('keeps the largest final shares as lines and sums the rest into one column', () => {
    const names = ['a', 'b', 'c', 'd'];
    const shares = [
      [0.25, 0.25, 0.25, 0.25],
      [0.4, 0.3, 0.2, 0.1],
      [0.6, 0.3, 0.0999, 0.0001],
    ];
    const c = compactEvolution({ names, shares }, 2);
    expect(c.names).toEqual(['a', 'b']);
    expect(c.entries).toEqual([0, 1]);
    expect(c.folded).toBe(2);
    expect(c.shares[2][2]).toBeCloseTo(0.1, 12);
    // An entry below the threshold at the end gets no line even when there is room.
    expect(compactEvolution({ names, shares }, 6).names).toEqual(['a', 'b', 'c']);
    // Already compact: returned as it is.
    expect(compactEvolution(c)).toBe(c);
    expect(
      sharesInWords([
        { name: 'a', share: 0.6 },
        { name: 'c', share: 0.0999 },
      ]),
    ).toBe('a 60 %, c 10.0 %');
  });

  it('thins long runs to a few hundred generations, keeping the first and the last', () => {
    const shares = Array.from({ length: 1001 }, (_, g) => [1 - g / 2000, g / 2000]);
    const c = compactEvolution({ names: ['x', 'y'], shares }, 6, 1e-3, 200);
    expect(c.generation.length).toBeLessThanOrEqual(202);
    expect(c.generation[0]).toBe(0);
    expect(c.generation.at(-1)).toBe(1000);
    expect(c.shares.at(-1)).toEqual([0.5, 0.5]);
  });
});
