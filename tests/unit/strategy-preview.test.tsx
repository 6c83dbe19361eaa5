// @vitest-environment happy-dom
import { cleanup, render, screen, within } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import { StrategyPreview } from '#app/components/strategy-preview';
import { libraryStrategy } from '#app/lib/automata';

const DBF48 = { T: 50, S: 12, P: 25, R: 48 };

afterEach(cleanup);

describe('StrategyPreview', () => {
  it('shows the moves against each library opponent and the exact points per round', () => {
    render(<StrategyPreview strategy={libraryStrategy('TFT')} game={DBF48} delta={0.75} rounds={4} />);
    const table = screen.getByTestId('strategy-preview');
    const alld = within(table).getByRole('row', { name: /vs ALLD/ });
    // Source: common practice (TFT opens with C, then copies the partner): C D D D against ALLD.
    expect(within(alld).getByLabelText('yours: C D D D')).toBeTruthy();
    expect(within(alld).getByLabelText('ALLD: D D D D')).toBeTruthy();
    // Source: methods.md §4 check matrix [calc]: V(TFT vs ALLD) = S + δP/(1−δ) = 12 + 75 = 87 → 21.75 per round.
    expect(alld.textContent).toContain('21.75');
    // Against ALLC, TFT cooperates every round: R = 48 per round. Source: common practice.
    expect(within(table).getByRole('row', { name: /vs ALLC/ }).textContent).toContain('48');
  });

  it('waits for a valid strategy instead of playing a broken one', () => {
    const broken = { id: 'X', name: 'x', states: [{ action: 'C' as const, next: { cc: 1, cd: 0, dc: 0, dd: 0 } }] };
    render(<StrategyPreview strategy={broken} game={DBF48} delta={0.75} />);
    expect(screen.queryByTestId('strategy-preview')).toBeNull();
    expect(screen.getByText(/once the strategy has no problems left/)).toBeTruthy();
  });
});
