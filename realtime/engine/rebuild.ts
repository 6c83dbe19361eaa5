/**
 * Rebuild a session's state from what the hub stored: the frozen design, the seed, the participant
 * rows, the choice rows and the small event log. Every stored row carries the engine's sequence
 * number, so replaying them in that order through `step` repeats the live run exactly:
 * - a participant row replays as its first join, a log row as its staff event (or re-join);
 * - a 'player' row replays as the choice, the 'timeout' rows of one round as one timeout;
 * - 'computer' rows are not replayed: the engine makes them again and they must come out equal.
 * Any difference (a row the replay would not produce, a rejected event) throws a RebuildError:
 * stored data and engine disagree, and the hub should not guess.
 * Connection state is not stored and starts empty.
 */
import type { Design } from '#app/lib/design';
import type { Seed } from '#app/lib/rng';
import { createSession, newBatchScope, step } from './engine';
import type { StoredChoice, Effect, EngineEvent, EngineState, LogRow, ParticipantRow } from './types';

export class RebuildError extends Error {
  constructor(
    message: string,
    readonly seq: number | null,
  ) {
    super(message);
    this.name = 'RebuildError';
  }
}

type Item =
  | { seq: number; kind: 'participant'; row: ParticipantRow }
  | { seq: number; kind: 'log'; row: LogRow }
  | { seq: number; kind: 'choice'; row: StoredChoice };

/** JSON with sorted keys, so rows read back from a database compare by content, not key order. */
function canonical(value: unknown): string {
  if (value === null || typeof value !== 'object') return JSON.stringify(value);
  if (Array.isArray(value)) return `[${value.map(canonical).join(',')}]`;
  const entries = Object.entries(value as Record<string, unknown>)
    .filter(([, v]) => v !== undefined)
    .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
  return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonical(v)}`).join(',')}}`;
}

export function rebuild(
  design: Design,
  seed: Seed,
  participants: readonly ParticipantRow[],
  storedChoices: readonly StoredChoice[],
  staffEvents: readonly LogRow[],
  opts: { sessionId: string },
): EngineState {
  const items: Item[] = [
    ...participants.map((row): Item => ({ seq: row.seq, kind: 'participant', row })),
    ...staffEvents.map((row): Item => ({ seq: row.seq, kind: 'log', row })),
    ...storedChoices.map((row): Item => ({ seq: row.seq, kind: 'choice', row })),
  ].sort((a, b) => a.seq - b.seq);
  for (let i = 1; i < items.length; i++) {
    if (items[i].seq === items[i - 1].seq) throw new RebuildError(`Two stored rows share sequence number ${items[i].seq}`, items[i].seq);
  }

  let state = createSession({ sessionId: opts.sessionId, design, seed });
  const produced = new Map<number, Effect>();
  // One batch scope for the whole replay: only the final state is used (a failed step throws), so
  // the big records are copied once, not once per row — and no views are built.
  const scope = newBatchScope();
  const apply = (event: EngineEvent, at: number, seq: number): void => {
    const res = step(state, event, at, { views: 'none', batch: scope });
    if (res.error) throw new RebuildError(`Replaying ${event.type} at #${seq} failed: ${res.error.code} (${res.error.message})`, seq);
    state = res.state;
    for (const e of res.effects) {
      if (e.type === 'persist-choice') produced.set(e.row.seq, e);
      else if (e.type === 'persist-participant' || e.type === 'persist-log') produced.set(e.row.seq, e);
    }
  };

  for (const item of items) {
    if (produced.has(item.seq)) continue; // made by an earlier replayed event; checked below
    if (item.kind === 'participant') {
      apply({ type: 'join', participantId: item.row.id }, item.row.joinedAt, item.seq);
    } else if (item.kind === 'log') {
      apply(item.row.event as EngineEvent, item.row.at, item.seq);
    } else {
      const row = item.row;
      if (row.source === 'player') {
        if (!row.participantId || !row.clientChoiceId) throw new RebuildError('A player row without participant or client id', row.seq);
        apply(
          {
            type: 'choose',
            participantId: row.participantId,
            supergame: row.supergame,
            round: row.round,
            action: row.action,
            clientChoiceId: row.clientChoiceId,
          },
          row.at,
          row.seq,
        );
      } else if (row.source === 'timeout') {
        apply({ type: 'timeout', pairId: row.pairId, round: row.round }, row.at, row.seq);
      } else {
        throw new RebuildError(`Computer row #${row.seq} is not what the engine plays at that point`, row.seq);
      }
    }
  }

  // every stored row must be exactly what the replay produced, and nothing may be missing
  for (const item of items) {
    const e = produced.get(item.seq);
    const kindOf = { choice: 'persist-choice', participant: 'persist-participant', log: 'persist-log' } as const;
    const same = e !== undefined && e.type === kindOf[item.kind] && 'row' in e && canonical(e.row) === canonical(item.row);
    if (!same) throw new RebuildError(`Stored row #${item.seq} differs from the replay`, item.seq);
  }
  if (produced.size !== items.length) {
    const stored = new Set(items.map((i) => i.seq));
    const missing = [...produced.keys()].filter((k) => !stored.has(k));
    throw new RebuildError(`The replay produced rows that were not stored: #${missing.join(', #')}`, missing[0] ?? null);
  }
  return state;
}
