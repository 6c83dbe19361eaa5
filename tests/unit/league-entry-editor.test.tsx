// @vitest-environment happy-dom
import { cleanup, fireEvent, render, screen, within } from '@testing-library/react';
import { afterEach, describe, expect, it } from 'vitest';
import { withStart } from '#app/components/automaton-builder';
import { issuesByState, LeagueEntryEditor, libraryMatch } from '#app/components/league-entry-editor';
import { libraryStrategy } from '#app/lib/automata';
import { LEAGUE_MAX_STATES } from '#app/lib/league';
import { readStrategyFile } from '#app/lib/strategy-file';

// Dal Bó & Fréchette (2011), δ = 3/4 treatment with R = 48.
const DBF48 = { T: 50, S: 12, P: 25, R: 48 };

afterEach(cleanup);

/** The strategy the form would post, read back through the file format's own reader. */
function posted(container: HTMLElement) {
  const input = container.querySelector<HTMLInputElement>('input[type=hidden][name=strategy]');
  expect(input).not.toBeNull();
  const read = readStrategyFile(JSON.parse(input!.value));
  if (!read.ok) throw new Error(`posted strategy does not read: ${read.issues.map((i) => i.message).join(' ')}`);
  return read.automaton;
}

const select = (label: string) => screen.getByLabelText(label) as HTMLSelectElement;

describe('LeagueEntryEditor', () => {
  it('starts from a library strategy, describes it in words and previews its moves', () => {
    const { container } = render(<LeagueEntryEditor game={DBF48} delta={0.75} />);
    // Nothing is posted before a starting point is picked.
    expect(container.querySelector('input[name=strategy]')).toBeNull();
    fireEvent.click(screen.getByRole('button', { name: /Tit-for-tat · TFT/ }));
    expect(screen.getByText(/^Started from/).textContent).toContain('Started from Tit-for-tat (TFT)');
    // Source: common practice (TFT opens with C, then copies the partner's last action).
    expect(screen.getByTestId('entry-words').textContent).toContain('starts with C and then copies what you did last round');
    const preview = screen.getByTestId('strategy-preview');
    const alld = within(preview).getByRole('row', { name: /vs ALLD/ });
    expect(within(alld).getByLabelText('yours: C D D D D D D D')).toBeTruthy();
    // Source: methods.md §4 check matrix [calc]: V(TFT vs ALLD) = S + δP/(1−δ) = 12 + 75 = 87 → 21.75 per round.
    expect(alld.textContent).toContain('21.75');
    expect(posted(container).states).toEqual(libraryStrategy('TFT').states);
  });

  it('edits a library strategy into another: the transitions and the action of each state', () => {
    const { container } = render(<LeagueEntryEditor game={DBF48} delta={0.75} />);
    fireEvent.click(screen.getByRole('button', { name: /Grim trigger · Grim/ }));
    // Grim → forgiving after (C, D)? Make state 2 go back to state 1 after mutual cooperation and
    // after the partner's C: that is TFT-like punishment but keyed on mutual cooperation.
    fireEvent.change(select('State 2, next after (C, C)'), { target: { value: '0' } });
    fireEvent.change(select('State 2, next after (D, C)'), { target: { value: '0' } });
    const a = posted(container);
    expect(a.states[1].next).toEqual({ cc: 0, cd: 1, dc: 0, dd: 1 });
    expect(libraryMatch(a)).toBeNull();
    // Flip state 1 to D: the entry now opens with D.
    fireEvent.change(select('State 1 plays'), { target: { value: 'D' } });
    expect(posted(container).states[0].action).toBe('D');
    const vsAllc = within(screen.getByTestId('strategy-preview')).getByRole('row', { name: /vs ALLC/ });
    expect(within(vsAllc).getByLabelText(/^yours: D/)).toBeTruthy();
  });

  it('builds from blank: an unreachable state is flagged beside it, and the preview waits', () => {
    const { container } = render(<LeagueEntryEditor game={DBF48} delta={0.75} />);
    fireEvent.click(screen.getByRole('button', { name: /^Blank/ }));
    fireEvent.click(screen.getByRole('button', { name: 'Add a state' }));
    expect(screen.getByTestId('state-2-issues').textContent).toContain('State 2 cannot be reached from the starting state 1.');
    expect(screen.queryByTestId('strategy-preview')).toBeNull();
    expect(screen.getByTestId('entry-words').textContent).toContain('One problem to fix');
    // Punish a defection: after (C, D) go to state 2 (plays D, stays there): Grim trigger, built by hand.
    fireEvent.change(select('State 1, next after (C, D)'), { target: { value: '1' } });
    fireEvent.change(select('State 1, next after (D, D)'), { target: { value: '1' } });
    fireEvent.change(select('State 1, next after (D, C)'), { target: { value: '1' } });
    expect(screen.queryByTestId('state-2-issues')).toBeNull();
    const a = posted(container);
    expect(libraryMatch(a)?.id).toBe('Grim');
    // Recognised as the library's Grim, it is worded as Grim is. Source: Friedman (1971) grim trigger.
    expect(screen.getByTestId('entry-words').textContent).toContain('from then on it chooses D for the rest of the supergame');
    // Source: methods.md §4 [calc]: Grim vs ALLD at δ = 3/4 equals TFT vs ALLD, 21.75 per round.
    expect(within(screen.getByTestId('strategy-preview')).getByRole('row', { name: /vs ALLD/ }).textContent).toContain('21.75');
  });

  it(`stops at ${LEAGUE_MAX_STATES} states`, () => {
    render(<LeagueEntryEditor game={DBF48} delta={0.75} />);
    fireEvent.click(screen.getByRole('button', { name: /^Blank/ }));
    const add = screen.getByRole('button', { name: 'Add a state' }) as HTMLButtonElement;
    for (let k = 1; k < LEAGUE_MAX_STATES; k++) fireEvent.click(add);
    expect(screen.getAllByLabelText(/^State \d+ plays$/)).toHaveLength(LEAGUE_MAX_STATES);
    expect(add.disabled).toBe(true);
  });

  it('keeps a saved entry and shows the name error the server sent', () => {
    const { container } = render(
      <LeagueEntryEditor
        game={DBF48}
        delta={0.75}
        defaultName="Patient"
        defaultStrategy={libraryStrategy('TF2T')}
        errors={{ name: 'Give your entry a name.' }}
      />,
    );
    expect((screen.getByLabelText("Your entry's name") as HTMLInputElement).value).toBe('Patient');
    expect(screen.getByText('Give your entry a name.')).toBeTruthy();
    expect(posted(container).states).toEqual(libraryStrategy('TF2T').states);
  });

  it('"start here" makes another state the start without changing how the strategy plays from it', () => {
    // TFT started from its D state is suspicious tit-for-tat, state for state.
    // Source: common practice (STFT opens with D, then copies the partner).
    expect(withStart(libraryStrategy('TFT'), 1).states).toEqual(libraryStrategy('STFT').states);
    const { container } = render(<LeagueEntryEditor game={DBF48} delta={0.75} />);
    fireEvent.click(screen.getByRole('button', { name: /Tit-for-tat · TFT/ }));
    fireEvent.click(screen.getByRole('button', { name: /Start here/ }));
    expect(libraryMatch(posted(container))?.id).toBe('STFT');
  });

  it('shows the save button once there is a strategy, and says when what is on screen is not saved', () => {
    render(<LeagueEntryEditor game={DBF48} delta={0.75} submit={<button type="submit">Save</button>} />);
    expect(screen.queryByRole('button', { name: 'Save' })).toBeNull();
    fireEvent.click(screen.getByRole('button', { name: /Tit-for-tat · TFT/ }));
    expect(screen.getByRole('button', { name: 'Save' })).toBeTruthy();
    expect(screen.getByTestId('unsaved').textContent).toContain('Not entered yet');
    cleanup();

    const saved = { name: 'Patient', automaton: libraryStrategy('TF2T') };
    const props = { game: DBF48, delta: 0.75, defaultName: 'Patient', defaultStrategy: libraryStrategy('TF2T'), saved };
    render(<LeagueEntryEditor {...props} />);
    expect(screen.queryByTestId('unsaved')).toBeNull();
    fireEvent.change(select('State 3 plays'), { target: { value: 'C' } });
    expect(screen.getByTestId('unsaved').textContent).toContain('changes that are not saved yet');
    fireEvent.change(select('State 3 plays'), { target: { value: 'D' } });
    expect(screen.queryByTestId('unsaved')).toBeNull();
    fireEvent.change(screen.getByLabelText("Your entry's name"), { target: { value: 'Very patient' } });
    expect(screen.getByTestId('unsaved')).toBeTruthy();
  });

  it('sorts problems to their state or to the whole strategy', () => {
    const { perState, whole } = issuesByState(
      [
        { path: 'states', message: 'too many' },
        { path: 'states[1].next.cd', message: 'no transition' },
        { path: 'states[0]', message: 'x' },
      ],
      2,
    );
    expect(whole.map((i) => i.message)).toEqual(['too many']);
    expect(perState.map((l) => l.map((i) => i.message))).toEqual([['x'], ['no transition']]);
  });
});
