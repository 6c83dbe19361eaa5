// A room of phones over socket.io, each answering as soon as its choosing view arrives, as a
// lecture hall does. Shared by the crowd test (completeness, exactly-once storage) and the live
// benchmark (scripts/bench-live.ts: the same play, timed), so both measure one behaviour.
import { io } from 'socket.io-client';
import type { ParticipantView } from '#realtime/engine/types';
import { supersedes } from '#realtime/protocol';
import { ClientFrom, requestCode } from '#tests/security/helpers';
import type { Client } from './http';
import type { TestSocket } from './live';

/**
 * The real sign-in, from a loopback address of the crowd's own (a lecture hall's network), so a
 * hundred code requests do not eat the suite's per-network allowance on 127.0.0.1.
 */
export async function signInFromHall(email: string, hall = '127.0.9.1'): Promise<Client> {
  const c = new ClientFrom(hall);
  const { code } = await requestCode(c, email);
  const res = await c.post('/sign-in/code', { intent: 'verify', code });
  if (res.status !== 302 || !c.cookies.has('__parley_auth')) throw new Error(`the code of ${email} was refused (${res.status})`);
  return c;
}

export interface Phone {
  socket: TestSocket;
  sessionId: number;
}

interface Emitted {
  phone: number;
  sessionId: number;
  supergame: number;
  round: number;
  pairId: string | null;
  clientChoiceId: string;
  action: 'C' | 'D';
  emittedAt: number;
  ackedAt: number | null;
  /** the first view of this phone that shows this round's result */
  resultAt: number | null;
  refused: string | null;
}

export interface CrowdResult {
  /** every phone received its `finished` view and every emitted choice was answered */
  complete: boolean;
  finished: number;
  emitted: number;
  /** clientChoiceIds acknowledged with `ok: true` */
  acked: Set<string>;
  /** error codes of refused choices, with how often each came */
  refused: Record<string, number>;
  /** refusals that were retried (and then answered), by code */
  retried: Record<string, number>;
  ackMs: number[];
  /** per pair and round: the partner who chose second, from its emit to its result view */
  slowerPartnerMs: number[];
  /** per phone and supergame boundary: the supergame's last choice → this phone's next choosing view */
  boundaryMs: number[];
  reconnects: number;
  /** for a failure's message: each unfinished phone's last view, and the choices never answered */
  stuck: { phone: number; last: string | null; unanswered: string[] }[];
}

/**
 * A socket.io client with the sign-in cookie that reconnects like the phone page; playCrowd asks
 * for the view again (`session:watch`) after each reconnect and resends unanswered choices.
 */
export function connectPhone(url: string, cookie: string): Promise<TestSocket> {
  const s: TestSocket = io(url, { transports: ['websocket'], extraHeaders: { cookie }, forceNew: true, reconnectionDelayMax: 2000 });
  return new Promise((resolve, reject) => {
    const t = setTimeout(() => reject(new Error('the phone did not connect within 30 s')), 30_000);
    s.once('connect', () => {
      clearTimeout(t);
      resolve(s);
    });
    s.once('connect_error', (e) => {
      clearTimeout(t);
      reject(e);
    });
  });
}

/**
 * Refusals a phone answers by sending the same choice again: the database did not answer
 * ('unavailable'), or the server restarted and this socket has not asked for its view yet.
 */
const TRANSIENT = new Set(['unavailable', 'forbidden', 'server-error', 'rate-limited']);

const sameResult = (v: ParticipantView, e: Emitted) => v.lastResult?.supergame === e.supergame && v.lastResult.round === e.round;

/**
 * Every phone watches its session as a participant and chooses (C with probability `cooperate`)
 * the moment a choosing view without its own choice arrives. Resolves when every phone has its
 * `finished` view and every choice its answer, or after `timeoutMs` with `complete: false`.
 * `start` runs once every phone watches (the Conductor's start command).
 */
export async function playCrowd(
  phones: Phone[],
  opts: {
    start: () => Promise<void>;
    timeoutMs: number;
    cooperate?: number;
    idPrefix?: string;
    /** ms a phone waits before it answers a choosing view (default 0: at once) */
    thinkMs?: () => number;
    /** receives a function that counts the choices emitted and not yet answered (in flight) */
    expose?: (unanswered: () => number) => void;
  },
): Promise<CrowdResult> {
  const now = () => performance.now();
  const emits: Emitted[] = [];
  const emittedIds = new Set<string>();
  /** `${sessionId}/${supergame}` → phone → time of its first choosing view of that supergame */
  const firstChoosing = new Map<string, Map<number, number>>();
  const waitingResult = phones.map(() => [] as Emitted[]);
  const finishedAt: (number | null)[] = phones.map(() => null);
  const lastView: (string | null)[] = phones.map(() => null);
  const shownView: (ParticipantView | null)[] = phones.map(() => null);
  let reconnects = 0;
  let answered = 0;
  /** refusals the phone retries (a restarting server, a database that does not answer) */
  const transient: Record<string, number> = {};
  let settle: () => void = () => undefined;
  const allDone = new Promise<void>((r) => (settle = r));
  const check = () => {
    if (finishedAt.every((f) => f !== null) && answered === emits.length) settle();
  };
  opts.expose?.(() => emits.filter((e) => e.ackedAt === null && e.refused === null).length);
  const prefix = opts.idPrefix ?? `crowd-${process.pid}-${Date.now().toString(36)}`;

  const submit = (i: number, e: Emitted) => {
    const { socket } = phones[i];
    socket
      .timeout(120_000)
      .emitWithAck('choice:submit', {
        sessionId: e.sessionId,
        supergame: e.supergame,
        round: e.round,
        action: e.action,
        clientChoiceId: e.clientChoiceId,
      })
      .then((res) => {
        if (e.ackedAt !== null || e.refused !== null) return;
        if (!res.ok && TRANSIENT.has(res.code)) {
          // As the phone's outbox does: the same choice again, after a moment (on a reconnect the
          // handler below sends it at once).
          transient[res.code] = (transient[res.code] ?? 0) + 1;
          setTimeout(() => {
            if (e.ackedAt === null && e.refused === null && socket.connected) submit(i, e);
          }, 500);
          return;
        }
        if (res.ok) e.ackedAt = now();
        else e.refused = res.code;
        answered++;
        check();
      })
      // No answer in time (a dropped connection): the phone sends the same choice again on reconnect.
      .catch(() => undefined);
  };

  const onView = (i: number, v: ParticipantView) => {
    // As the phone page does (use-session.ts): a view older than the one shown is dropped.
    if (!supersedes(v, shownView[i])) return;
    shownView[i] = v;
    const t = now();
    const { sessionId } = phones[i];
    lastView[i] =
      `${v.status} sg${v.supergame} r${v.round} own=${v.ownChoice ?? '-'} last=${v.lastResult ? `${v.lastResult.supergame}/${v.lastResult.round}` : '-'}`;
    if (v.status === 'finished') {
      finishedAt[i] ??= t;
      check();
    }
    if (waitingResult[i].length) {
      waitingResult[i] = waitingResult[i].filter((e) => {
        if (!sameResult(v, e)) return true;
        e.resultAt = t;
        return false;
      });
    }
    if (v.status !== 'choosing' || v.round === null) return;
    const sgKey = `${sessionId}/${v.supergame}`;
    let first = firstChoosing.get(sgKey);
    if (!first) firstChoosing.set(sgKey, (first = new Map()));
    if (!first.has(i)) first.set(i, t);
    if (v.ownChoice) return;
    const clientChoiceId = `${prefix}-${i}-${v.supergame}-${v.round}`;
    if (emittedIds.has(clientChoiceId)) return;
    emittedIds.add(clientChoiceId);
    const e: Emitted = {
      phone: i,
      sessionId,
      supergame: v.supergame,
      round: v.round,
      pairId: v.pairId,
      clientChoiceId,
      action: Math.random() < (opts.cooperate ?? 0.6) ? 'C' : 'D',
      emittedAt: t,
      ackedAt: null,
      resultAt: null,
      refused: null,
    };
    emits.push(e);
    waitingResult[i].push(e);
    const think = opts.thinkMs?.() ?? 0;
    if (think > 0) setTimeout(() => submit(i, e), think);
    else submit(i, e);
  };

  const watch = async (i: number) => {
    const { socket, sessionId } = phones[i];
    for (let attempt = 0; ; attempt++) {
      const res = await socket.emitWithAck('session:watch', { sessionId, as: 'participant' });
      if (res.ok) return onView(i, res.data as ParticipantView);
      // As the phone page does (use-session.ts): a refused watch during a restart or a failover
      // (no owner yet, the database not answering) is asked again a second later.
      if (!TRANSIENT.has(res.code) || attempt >= 30 || !socket.connected) {
        throw new Error(`phone ${i} could not watch session ${sessionId}: ${res.code} ${res.message}`);
      }
      transient[`watch:${res.code}`] = (transient[`watch:${res.code}`] ?? 0) + 1;
      await new Promise((r) => setTimeout(r, 1000));
    }
  };

  phones.forEach(({ socket }, i) => {
    socket.on('view:participant', (v) => onView(i, v));
    socket.io.on('reconnect', () => {
      reconnects++;
      void watch(i)
        .then(() => {
          for (const e of emits) if (e.phone === i && e.ackedAt === null && e.refused === null) submit(i, e);
        })
        .catch(() => undefined);
    });
  });
  for (let i = 0; i < phones.length; i += 50) await Promise.all(phones.slice(i, i + 50).map((_, k) => watch(i + k)));
  await opts.start();
  let timer: NodeJS.Timeout | undefined;
  const complete = await Promise.race([
    allDone.then(() => true),
    new Promise<boolean>((r) => (timer = setTimeout(() => r(false), opts.timeoutMs))),
  ]);
  clearTimeout(timer);

  const refused: Record<string, number> = {};
  for (const e of emits) if (e.refused) refused[e.refused] = (refused[e.refused] ?? 0) + 1;
  const byPairRound = new Map<string, Emitted[]>();
  for (const e of emits) {
    const k = `${e.sessionId}/${e.supergame}/${e.pairId}/${e.round}`;
    byPairRound.set(k, [...(byPairRound.get(k) ?? []), e]);
  }
  const slowerPartnerMs: number[] = [];
  for (const pair of byPairRound.values()) {
    const later = pair.reduce((a, b) => (b.emittedAt > a.emittedAt ? b : a));
    if (pair.length === 2 && later.resultAt !== null) slowerPartnerMs.push(later.resultAt - later.emittedAt);
  }
  const boundaryMs: number[] = [];
  const lastChoice = new Map<string, number>();
  for (const e of emits) {
    const k = `${e.sessionId}/${e.supergame}`;
    lastChoice.set(k, Math.max(lastChoice.get(k) ?? 0, e.emittedAt));
  }
  for (const [k, last] of lastChoice) {
    const [sessionId, sg] = k.split('/').map(Number);
    for (const t of firstChoosing.get(`${sessionId}/${sg + 1}`)?.values() ?? []) boundaryMs.push(t - last);
  }
  return {
    complete,
    finished: finishedAt.filter((f) => f !== null).length,
    emitted: emits.length,
    acked: new Set(emits.filter((e) => e.ackedAt !== null).map((e) => e.clientChoiceId)),
    refused,
    retried: transient,
    ackMs: emits.flatMap((e) => (e.ackedAt === null ? [] : [e.ackedAt - e.emittedAt])),
    slowerPartnerMs,
    boundaryMs,
    reconnects,
    stuck: phones.flatMap((_, i) =>
      finishedAt[i] === null || emits.some((e) => e.phone === i && e.ackedAt === null && e.refused === null)
        ? [
            {
              phone: i,
              last: lastView[i],
              unanswered: emits
                .filter((e) => e.phone === i && e.ackedAt === null && e.refused === null)
                .map((e) => `sg${e.supergame} r${e.round}`),
            },
          ]
        : [],
    ),
  };
}

/** The q-quantile (0..1) of a sample, nearest rank; NaN for an empty one. */
export function quantile(xs: readonly number[], q: number): number {
  if (xs.length === 0) return Number.NaN;
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil(q * s.length) - 1))];
}
