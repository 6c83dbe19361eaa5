/**
 * Supergames: matching and opening the pairs of the next supergame, its summary, and moving on
 * (or completing the session) once every pair is done.
 */
import { supergameDraws } from '#app/lib/draws';
import { matchSupergame } from '#app/lib/matching';
import { type Draft, openPairIds, playing } from './draft';
import { advancePair, openRound } from './rounds';
import type { EngineState, PairState, SupergameSummary } from './types';

export function summarise(s: EngineState, truncated: boolean): SupergameSummary {
  const sg = s.supergame!;
  let playerChoices = 0;
  let cooperate = 0;
  let round1Choices = 0;
  let round1Cooperate = 0;
  for (const id of sg.pairIds) {
    for (const rec of s.pairs[id].rounds) {
      rec.sources.forEach((src, i) => {
        if (src !== 'player') return;
        playerChoices++;
        if (rec.actions[i] === 'C') cooperate++;
        if (rec.round === 1) {
          round1Choices++;
          if (rec.actions[i] === 'C') round1Cooperate++;
        }
      });
    }
  }
  return {
    supergame: sg.number,
    length: sg.draws.length,
    roundsPlayed: sg.draws.roundsPlayed,
    pairs: sg.pairIds.length,
    playerChoices,
    cooperate,
    round1Choices,
    round1Cooperate,
    truncated,
  };
}

export function beginSupergame(d: Draft, number: number, at: number): void {
  const s = d.s;
  const design = s.design;
  const pool = s.joinOrder.filter((id) => {
    const p = s.participants[id];
    return p.status === 'active' && p.entersAt <= number;
  });
  const oddCounts: Record<string, number> = {};
  for (const id of pool) oddCounts[id] = s.participants[id].oddCount;
  // s.pairs still holds the supergame just played: nobody meets that partner again when avoidable
  const lastPairs = Object.values(s.pairs).flatMap((pair): [string, string][] => {
    const [x, y] = pair.seats;
    return x.participantId && y.participantId ? [[x.participantId, y.participantId]] : [];
  });
  const matching = matchSupergame({
    supergame: number,
    participants: pool,
    pastPairs: s.pastPairs,
    lastPairs,
    oddCounts,
    policy: design.oddCount,
    seed: s.seed,
  });
  for (const id of s.joinOrder) {
    const p = s.participants[id];
    if (p.pairId !== null || p.sittingOut) {
      const q = d.p(id);
      q.pairId = null;
      q.seat = null;
      q.sittingOut = false;
    }
  }
  // rows of the supergame before the previous one are no longer needed for idempotent retries
  const recent = d.w('recentChoices');
  for (const [id, rows] of Object.entries(recent)) {
    const keep = rows.filter((r) => r.supergame >= number - 1);
    if (keep.length === 0) delete recent[id];
    else if (keep.length !== rows.length) recent[id] = keep;
  }
  d.replace('pairs', {});
  const pairIds: string[] = [];
  const persisted: { pairId: string; participants: [string | null, string | null]; computerStrategy: string | null }[] = [];
  const newPair = (id: string, index: number, seats: PairState['seats']): void => {
    s.pairs[id] = {
      id,
      supergame: number,
      index,
      seats,
      round: 1,
      openedAt: at,
      deadline: null,
      remainingMs: null,
      pausedMs: 0,
      pending: [null, null],
      rounds: [],
      done: false,
      doneAt: null,
    };
    pairIds.push(id);
    seats.forEach((seat, i) => {
      if (!seat.participantId) return;
      const q = d.p(seat.participantId);
      q.pairId = id;
      q.seat = i as 0 | 1;
    });
    persisted.push({
      pairId: id,
      participants: [seats[0].participantId, seats[1].participantId],
      computerStrategy: seats[1].computer?.strategy ?? null,
    });
  };
  matching.pairs.forEach(([a, b], i) => {
    newPair(`s${number}-p${i + 1}`, i + 1, [
      { participantId: a, computer: null },
      { participantId: b, computer: null },
    ]);
  });
  if (matching.odd) {
    const q = d.p(matching.odd.participantId);
    q.oddCount += 1;
    if (matching.odd.kind === 'sit-out') {
      q.sittingOut = true;
    } else {
      const index = matching.pairs.length + 1;
      newPair(`s${number}-p${index}`, index, [
        { participantId: matching.odd.participantId, computer: null },
        {
          participantId: null,
          computer: { strategy: matching.odd.strategy ?? 'TFT', state: 0, fromRound: 1, reason: 'odd-count' },
        },
      ]);
    }
  }
  s.supergame = {
    number,
    startedAt: at,
    draws: supergameDraws(s.seed, design.delta, number, design.termination),
    pairIds,
    matching,
  };
  d.persists.push({ type: 'persist-matching', matching, pairs: persisted });
  d.session(at);
  for (const id of pairIds) {
    openRound(d, s.pairs[id], 1, at);
    advancePair(d, id, at);
  }
}

export function completeSession(d: Draft, at: number): void {
  d.s.status = 'complete';
  d.s.completedAt = at;
  d.s.pausedAt = null;
  d.session(at);
}

/** After any change: while every pair of the supergame is done, move to the next one (or finish). */
export function settle(d: Draft): void {
  const s = d.s;
  while (playing(s) && s.supergame && openPairIds(s).length === 0) {
    const sg = s.supergame;
    const boundary = Math.max(sg.startedAt, ...sg.pairIds.map((id) => s.pairs[id].doneAt ?? sg.startedAt));
    s.summaries = [...s.summaries, summarise(s, false)];
    const humanPairs: [string, string][] = [];
    for (const id of sg.pairIds) {
      const [x, y] = s.pairs[id].seats;
      if (x.participantId && y.participantId) humanPairs.push([x.participantId, y.participantId]);
    }
    s.pastPairs = [...s.pastPairs, ...humanPairs];
    if (sg.number >= s.design.supergames || s.endAfterSupergame) {
      completeSession(d, boundary);
      return;
    }
    beginSupergame(d, sg.number + 1, boundary);
  }
}

/** The supergame a new joiner would enter, or null when none is left: the join handler refuses
 * them then, and the big screen hides the join code. */
export function lateEntry(s: EngineState): number | null {
  if (s.status === 'open') return 1;
  if (s.status !== 'running' && s.status !== 'paused') return null;
  // a late joiner enters at the next supergame; with none left, joining now only means waiting
  const next = (s.supergame?.number ?? 0) + 1;
  return next <= s.design.supergames && !s.endAfterSupergame ? next : null;
}

/** Why a new joiner is turned away while the session runs (no supergame left to enter), or null. */
export function lateEntryRefusal(s: EngineState): string | null {
  if ((s.status !== 'running' && s.status !== 'paused') || lateEntry(s) !== null) return null;
  return s.endAfterSupergame
    ? 'This session ends after the current supergame, so a new player could not play any more rounds.'
    : 'This session is in its last supergame, so a new player could not play any more rounds.';
}
