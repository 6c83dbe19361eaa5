// A league's state and run status in words, with an icon so colour never carries the meaning alone.
import type { LeagueRunStatus, LeagueState } from '#app/lib/league-design';

export const LEAGUE_STATE_WORDS: Record<LeagueState, { icon: string; word: string; means: string }> = {
  open: { icon: '●', word: 'Open', means: 'Participants can enter and revise strategies.' },
  closed: { icon: '■', word: 'Closed', means: 'Entries are closed; the league can be run.' },
  run: { icon: '✓', word: 'Run', means: 'Results are ready; only staff see them.' },
  published: { icon: '★', word: 'Published', means: 'Participants of the course see the results.' },
};

export const RUN_STATUS_WORDS: Record<LeagueRunStatus, { icon: string; word: string }> = {
  none: { icon: '○', word: 'Not run yet' },
  queued: { icon: '◷', word: 'Waiting for its turn' },
  running: { icon: '⟳', word: 'Computing' },
  done: { icon: '✓', word: 'Done' },
  failed: { icon: '✕', word: 'Failed' },
};

export function LeagueStateBadge({ state }: { state: LeagueState }) {
  const w = LEAGUE_STATE_WORDS[state];
  return (
    <span title={w.means} data-state={state}>
      <span aria-hidden="true">{w.icon} </span>
      {w.word}
    </span>
  );
}
