import { useCallback, useEffect, useRef, useState } from 'react';
import type { Action } from '#app/lib/automata';
import type { ParticipantView } from '#realtime/engine/types';
import { backoffMs, loadOutbox, newChoiceId, type OutboxEntry, outcomeOf, sameRound, saveOutbox } from './outbox';
import type { Ask } from './use-session';

export interface OutboxNote {
  tone: 'info' | 'error';
  text: string;
}

/**
 * The phone's choice for the open round, kept until the server has it (see outbox.ts): a tap
 * goes into the outbox, the outbox is sent whenever the socket is admitted to the session and the
 * server has its database, and resent with back-off after answers that leave the outcome open.
 */
export function useChoiceOutbox({
  sessionId,
  view,
  ready,
  storageOk,
  ask,
}: {
  sessionId: number;
  view: ParticipantView;
  ready: boolean;
  storageOk: boolean;
  ask: Ask;
}) {
  const [entry, setEntry] = useState<OutboxEntry | null>(null);
  const [confirmed, setConfirmed] = useState<Pick<OutboxEntry, 'supergame' | 'round' | 'action'> | null>(null);
  const [note, setNote] = useState<OutboxNote | null>(null);
  // A kept choice whose round closed first: what to say about it depends on the newest view.
  const [closed, setClosed] = useState<OutboxEntry | null>(null);
  const [retryTick, setRetryTick] = useState(0);
  const entryRef = useRef<OutboxEntry | null>(null);
  const inflight = useRef<number | null>(null);
  const attempts = useRef(0);
  const retryTimer = useRef<ReturnType<typeof setTimeout> | null>(null);
  const labels = view.labels;
  // The send effect's answer arrives later; it words its note with the newest labels without
  // re-running (a new view must not cut a back-off short).
  const labelsRef = useRef(labels);
  useEffect(() => {
    labelsRef.current = labels;
  });

  const put = useCallback(
    (e: OutboxEntry | null) => {
      entryRef.current = e;
      attempts.current = 0;
      saveOutbox(sessionId, e);
      setEntry(e);
    },
    [sessionId],
  );

  // A choice kept before a reload (read after hydration: the server has no sessionStorage).
  useEffect(() => {
    const kept = loadOutbox(sessionId);
    if (kept) {
      entryRef.current = kept;
      setEntry(kept);
    }
    return () => {
      if (retryTimer.current) clearTimeout(retryTimer.current);
    };
  }, [sessionId]);

  // The view can settle the kept choice by itself: the round has it, or the round is over.
  useEffect(() => {
    const e = entry;
    if (!e) return;
    const open = (view.status === 'choosing' || view.status === 'waiting-partner') && sameRound(e, view.supergame, view.round);
    if (open && view.ownChoice === null) return;
    put(null);
    if (open && view.ownChoice !== e.action)
      setNote({
        tone: 'info',
        text: `This round already has your choice ${labels[view.ownChoice!]}, so ${labels[e.action]} was not sent.`,
      });
    if (!open) setClosed(e);
  }, [view, labels, entry, put]);

  // A dropped connection leaves its answer unknown: forget the send in flight, send again when back.
  useEffect(() => {
    if (!ready) inflight.current = null;
  }, [ready]);

  useEffect(() => {
    const e = entry;
    if (!e || !ready || !storageOk || view.paused || inflight.current !== null) return;
    if (!sameRound(e, view.supergame, view.round) || view.ownChoice !== null) return;
    const attempt = Date.now() + Math.random();
    inflight.current = attempt;
    void ask((s) => s.emitWithAck('choice:submit', e)).then((res) => {
      const current = inflight.current === attempt;
      if (current) inflight.current = null;
      if (entryRef.current?.clientChoiceId !== e.clientChoiceId) return;
      const outcome = outcomeOf(res);
      // A late "stored" still counts; a late "try again" was overtaken by a newer send.
      if (!current && outcome !== 'stored') return;
      switch (outcome) {
        case 'stored':
          setConfirmed({ supergame: e.supergame, round: e.round, action: e.action });
          setNote(null);
          put(null);
          return;
        case 'retry': {
          const wait = backoffMs(attempts.current++);
          if (retryTimer.current) clearTimeout(retryTimer.current);
          retryTimer.current = setTimeout(() => setRetryTick((t) => t + 1), wait);
          return;
        }
        case 'closed':
          put(null);
          setClosed(e);
          return;
        case 'taken':
          put(null);
          setNote({ tone: 'info', text: `This round already has a recorded choice, so ${labelsRef.current[e.action]} was not sent.` });
          return;
        case 'refused':
          put(null);
          setNote({ tone: 'error', text: `${labelsRef.current[e.action]} was not recorded: ${res.ok ? '' : res.message}` });
      }
    });
  }, [entry, ready, storageOk, view.paused, view.supergame, view.round, view.ownChoice, retryTick, ask, put]);

  // A new round starts clean.
  useEffect(() => {
    setConfirmed(null);
  }, [view.supergame, view.round]);

  const choose = useCallback(
    (action: Action) => {
      if (view.round === null || entryRef.current || view.ownChoice !== null) return;
      put({ sessionId, supergame: view.supergame, round: view.round, action, clientChoiceId: newChoiceId() });
      setNote(null);
      setClosed(null);
    },
    [put, sessionId, view.round, view.supergame, view.ownChoice],
  );

  const waiting = entry && sameRound(entry, view.supergame, view.round) ? entry : null;
  const done = confirmed && sameRound(confirmed, view.supergame, view.round) ? confirmed.action : null;
  return { waiting, chosen: view.ownChoice ?? done ?? waiting?.action ?? null, note: closed ? closedNote(closed, view) : note, choose };

  /** What the phone can say about a kept choice whose round closed before the server had it. */
  function closedNote(e: OutboxEntry, v: ParticipantView): OutboxNote | null {
    const row = v.supergame === e.supergame ? v.history.find((h) => h.round === e.round) : undefined;
    // Stored after all (its answer was lost on the way): nothing to tell.
    if (row?.ownSource === 'player') return null;
    const base = `Round ${e.round} closed before your choice ${labels[e.action]} reached the server, so it was not recorded.`;
    if (row?.ownSource === 'timeout') return { tone: 'error', text: `${base} The timeout rule chose ${labels[row.own]} for you.` };
    const last = v.lastResult && v.lastResult.supergame === e.supergame && v.lastResult.round === e.round ? v.lastResult : null;
    return { tone: 'error', text: last ? `${base} The round was recorded with ${labels[last.own]} for you.` : base };
  }
}
