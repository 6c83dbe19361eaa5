/**
 * What each screen sees (product.md, "Play", "Floor and Conductor", "Big screen").
 * Participants never see their partner's pseudonym; the big screen shows aggregates only.
 */
import { describeBlock, describeDraw, drawRule, formatCutoff, supergameDraws } from '#app/lib/draws';
import { ACTION_PROFILES, profilePoints } from '#app/lib/stage-game';
import { lateEntry } from './supergames';
import type { BigScreenView, EngineState, FloorSeatView, FloorView, PairState, ParticipantView } from './types';

const other = (seat: 0 | 1): 0 | 1 => (seat === 0 ? 1 : 0);

function payoffTable(s: EngineState): ParticipantView['payoffTable'] {
  return ACTION_PROFILES.map(([own, partner]) => {
    const [ownPoints, partnerPoints] = profilePoints(s.design.payoffs, own, partner);
    return { own, partner, ownPoints, partnerPoints };
  });
}

/** The latest end-of-block announcement of a pair's supergame (block termination only). */
function blockNotice(s: EngineState, pair: PairState): string | null {
  const t = s.design.termination;
  if (t.kind !== 'block' || !s.supergame) return null;
  const revealed = pair.rounds.filter((r) => r.revealed);
  if (revealed.length === 0) return null;
  const lastRound = revealed[revealed.length - 1].round;
  const first = lastRound - ((lastRound - 1) % t.k);
  const draws = pair.rounds.filter((r) => r.round >= first && r.round <= lastRound).map((r) => r.draw);
  return describeBlock(draws, first, s.supergame.draws.length, s.design.delta);
}

export function participantView(s: EngineState, participantId: string): ParticipantView {
  const p = s.participants[participantId];
  if (!p) throw new Error(`"${participantId}" is not a participant of this session`);
  const sgNumber = s.supergame?.number ?? 0;
  const pair = p.pairId ? s.pairs[p.pairId] : null;
  const seat = p.seat;
  const finished = s.status === 'complete' || s.status === 'archived' || s.status === 'cancelled' || p.status === 'removed';
  const standard = s.design.termination.kind === 'standard';

  let status: ParticipantView['status'];
  let notice: ParticipantView['notice'] = null;
  // A participant removed in the lobby is out, not still waiting for the start.
  if ((s.status === 'draft' || s.status === 'open') && p.status !== 'removed') status = 'lobby';
  else if (finished) {
    status = 'finished';
    if (p.status === 'removed') notice = 'removed';
    else if (s.status === 'cancelled') notice = 'cancelled';
    else if (s.summaries[s.summaries.length - 1]?.truncated) notice = 'ended-early';
  } else if (!pair || seat === null) {
    if (p.entersAt > sgNumber && p.status === 'active') {
      status = 'lobby';
      notice = 'waiting-to-enter';
    } else {
      status = 'between-supergames';
      notice = p.sittingOut ? 'sitting-out' : p.status === 'handed' ? 'handed-to-computer' : null;
    }
  } else if (pair.done) {
    status = 'between-supergames';
    // handed over: the computer finished this supergame; the phone must not promise a new partner
    if (p.status === 'handed') notice = 'handed-to-computer';
  } else if (pair.seats[seat].computer) {
    status = 'between-supergames';
    notice = 'handed-to-computer';
  } else status = pair.pending[seat] ? 'waiting-partner' : 'choosing';

  let partner: ParticipantView['partner'] = null;
  if (pair && seat !== null) {
    const o = pair.seats[other(seat)];
    partner = o.computer
      ? { kind: 'computer', strategy: o.computer.strategy, reason: o.computer.reason, fromRound: o.computer.fromRound }
      : { kind: 'human' };
  }

  const history: ParticipantView['history'] =
    pair && seat !== null
      ? pair.rounds.map((r) => ({
          round: r.round,
          own: r.actions[seat],
          partner: r.actions[other(seat)],
          ownPayoff: r.payoffs[seat],
          partnerPayoff: r.payoffs[other(seat)],
          ownSource: r.sources[seat],
          draw: r.revealed ? r.draw : null,
          paid: r.revealed ? r.paid : null,
          sentence: r.revealed && standard ? describeDraw(r.draw, s.design.delta) : null,
        }))
      : [];

  const open = pair && !pair.done && !finished;
  return {
    kind: 'participant',
    sessionId: s.sessionId,
    seq: s.seq,
    participantId,
    pseudonym: p.pseudonym,
    status,
    sessionStatus: s.status,
    paused: s.status === 'paused',
    labels: { C: s.design.labels.C, D: s.design.labels.D },
    payoffTable: payoffTable(s),
    delta: s.design.delta,
    cutoff: formatCutoff(s.design.delta),
    termination: s.design.termination,
    supergame: sgNumber,
    supergames: s.design.supergames,
    round: pair ? pair.round : null,
    pairId: pair ? pair.id : null,
    partner,
    history,
    ownChoice: open && seat !== null ? (pair.pending[seat]?.action ?? null) : null,
    partnerHasChosen: open && seat !== null ? pair.pending[other(seat)] !== null : false,
    deadline: open ? pair.deadline : null,
    remainingMs: open ? pair.remainingMs : null,
    lastResult: p.last,
    blockNotice: pair ? blockNotice(s, pair) : null,
    totalPoints: p.points,
    notice,
  };
}

export function floorView(s: EngineState, now: number): FloorView {
  const roundMs = s.design.roundSeconds * 1000;
  const connected = (id: string): boolean | null => s.connections[id]?.connected ?? null;
  const alerts: FloorView['alerts'] = [];
  const pairs: FloorView['pairs'] = (s.supergame?.pairIds ?? []).map((id) => {
    const pair = s.pairs[id];
    const seatView = (i: 0 | 1): FloorSeatView => {
      const seat = pair.seats[i];
      const pid = seat.participantId;
      const row = pair.done ? null : pair.pending[i];
      const waited = now - pair.openedAt - pair.pausedMs;
      if (pid && !pair.done && !row && !seat.computer && s.status === 'running' && waited > roundMs / 2) {
        alerts.push({ participantId: pid, pseudonym: s.participants[pid].pseudonym, kind: 'slow' });
      }
      return {
        participantId: pid,
        pseudonym: pid ? s.participants[pid].pseudonym : null,
        computer: seat.computer,
        hasChosen: row !== null,
        source: row ? row.source : null,
        connected: pid ? connected(pid) : null,
        timeouts: pid ? s.participants[pid].timeouts : 0,
      };
    };
    // The pair waits for its slower member from the moment the first of the two chose.
    const chosen = pair.pending.filter((r): r is NonNullable<typeof r> => r !== null).map((r) => r.at);
    return {
      pairId: id,
      number: pair.index,
      round: pair.round,
      done: pair.done,
      seats: [seatView(0), seatView(1)],
      waitingSince: pair.done || chosen.length === 0 ? null : Math.min(...chosen),
      deadline: pair.done ? null : pair.deadline,
      remainingMs: pair.done ? null : pair.remainingMs,
    };
  });
  const sgNumber = s.supergame?.number ?? 0;
  const others: FloorView['others'] = [];
  for (const id of s.joinOrder) {
    const p = s.participants[id];
    // A phone asleep in the lobby is no alarm: nothing waits for it until the session runs.
    if (p.status === 'active' && connected(id) === false && (s.status === 'running' || s.status === 'paused')) {
      alerts.push({ participantId: id, pseudonym: p.pseudonym, kind: 'disconnected' });
    }
    if (p.pairId) continue;
    const why: FloorView['others'][number]['why'] =
      p.status === 'removed'
        ? 'removed'
        : p.status === 'handed'
          ? 'handed'
          : p.sittingOut
            ? 'sitting-out'
            : s.status === 'open' || s.status === 'draft'
              ? 'lobby'
              : p.entersAt > sgNumber
                ? 'waiting-to-enter'
                : 'lobby';
    others.push({ participantId: id, pseudonym: p.pseudonym, why, connected: connected(id) === true });
  }
  let choices = 0;
  let cooperate = 0;
  for (const id of s.supergame?.pairIds ?? []) {
    const last = s.pairs[id].rounds[s.pairs[id].rounds.length - 1];
    if (!last) continue;
    last.sources.forEach((src, i) => {
      if (src !== 'player') return;
      choices++;
      if (last.actions[i] === 'C') cooperate++;
    });
  }
  const present = s.joinOrder.filter((id) => s.participants[id].status === 'active').length;
  return {
    kind: 'floor',
    sessionId: s.sessionId,
    seq: s.seq,
    status: s.status,
    supergame: sgNumber,
    supergames: s.design.supergames,
    endAfterSupergame: s.endAfterSupergame,
    counts: {
      joined: s.joinOrder.length,
      present,
      connected: s.joinOrder.filter((id) => connected(id) === true).length,
      pairs: pairs.length,
      pairsDone: pairs.filter((x) => x.done).length,
    },
    pairs,
    others,
    alerts,
    currentCooperation: { choices, cooperate, rate: choices > 0 ? cooperate / choices : null },
  };
}

/** Rounds of a pair whose draws have been shown. Rounds are revealed in order (a block at a
 * time under block termination), so the revealed ones are a prefix: counting from the end costs
 * O(1) per pair under standard termination, at most O(block) under block termination. */
function revealedRounds(pair: PairState): number {
  for (let i = pair.rounds.length - 1; i >= 0; i--) if (pair.rounds[i].revealed) return i + 1;
  return 0;
}

/** The latest draw every pair has seen (`shown`: the fewest revealed rounds of any pair now). */
function latestDraw(s: EngineState, shown: number): BigScreenView['latestDraw'] {
  const sg = s.supergame;
  if (!sg) return null;
  const t = s.design.termination;
  let number = sg.number;
  let draws = sg.draws;
  let to = shown;
  if (shown === 0) {
    if (sg.number === 1) return null;
    // Between supergames the draw that ended the last one stays on the screen. The state keeps
    // only the current supergame's draws; the previous ones come again from the seed, exactly as
    // the engine drew them: O(its rounds), about 1/(1 − δ) numbers.
    number = sg.number - 1;
    draws = supergameDraws(s.seed, s.design.delta, number, t);
    to = draws.roundsPlayed;
  }
  const k = t.kind === 'block' ? t.k : 1;
  const from = to - ((to - 1) % k);
  const list = draws.draws.slice(from - 1, to);
  return {
    supergame: number,
    fromRound: from,
    toRound: to,
    draws: list,
    continues: to < draws.length,
    sentence: t.kind === 'block' ? describeBlock(list, from, draws.length, s.design.delta) : null,
  };
}

/**
 * The projector's aggregates. Rebuilt up to a few times a second in a large session, so it reads
 * each pair once: O(pairs) for the draw and progress, plus O(rounds resolved in this supergame)
 * for the cooperation by round (about pairs / (1 − δ) round records).
 */
export function bigScreenView(s: EngineState): BigScreenView {
  const ids = s.supergame?.pairIds ?? [];
  // counts by round number (index); a round appears once any pair has resolved it
  const choicesBy: number[] = [];
  const cooperateBy: number[] = [];
  let shown = ids.length ? Number.POSITIVE_INFINITY : 0;
  let pairsDone = 0;
  for (const id of ids) {
    const pair = s.pairs[id];
    shown = Math.min(shown, revealedRounds(pair));
    if (pair.done) pairsDone++;
    for (const r of pair.rounds) {
      const k = r.round;
      if (choicesBy[k] === undefined) {
        choicesBy[k] = 0;
        cooperateBy[k] = 0;
      }
      for (let i = 0; i < 2; i++) {
        if (r.sources[i] !== 'player') continue;
        choicesBy[k]++;
        if (r.actions[i] === 'C') cooperateBy[k]++;
      }
    }
  }
  const cooperationByRound: BigScreenView['cooperationByRound'] = [];
  choicesBy.forEach((choices, round) => {
    cooperationByRound.push({ round, choices, cooperate: cooperateBy[round], rate: choices > 0 ? cooperateBy[round] / choices : null });
  });
  const draws = s.supergame?.draws.draws ?? [];
  const rate = (c: number, n: number): number | null => (n > 0 ? c / n : null);
  const rule = drawRule(s.design.delta);
  return {
    kind: 'big-screen',
    sessionId: s.sessionId,
    seq: s.seq,
    status: s.status,
    joined: s.joinOrder.length,
    supergame: s.supergame?.number ?? 0,
    supergames: s.design.supergames,
    pairs: ids.length,
    pairsDone,
    drawsShown: draws.slice(0, shown),
    lateEntry: lateEntry(s),
    drawRule: { max: rule.max, cutoff: rule.cutoff },
    latestDraw: latestDraw(s, shown),
    cooperationByRound,
    bySupergame: s.summaries.map((x) => ({
      supergame: x.supergame,
      length: x.length,
      cooperation: rate(x.cooperate, x.playerChoices),
      round1Cooperation: rate(x.round1Cooperate, x.round1Choices),
      truncated: x.truncated,
    })),
  };
}
