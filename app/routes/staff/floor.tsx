import { useEffect, useState } from 'react';
import { useFetcher } from 'react-router';
import type { Route } from './+types/floor';
import type { loader as namesLoader } from './session-names';
import { useSessionView } from '#app/components/live/use-session';
import { CourseCrumbs, PageHeader } from '#app/components/shells';
import { Button, Notice } from '#app/components/ui';
import { LIBRARY } from '#app/lib/automata';
import { computerStrategyOf } from '#app/lib/design';
import { getSession } from '#app/models/live.server';
import { parseId, respondUnless } from '#app/utils/http.server';
import { requireCourseRole } from '#app/utils/permissions.server';
import { SessionStatusWord } from '#app/components/session-status';
import type { FloorSeatView } from '#realtime/engine/types';

export async function loader({ request, params }: Route.LoaderArgs) {
  const { course, role } = await requireCourseRole(request, params.courseId, ['instructor', 'assistant']);
  const session = await getSession(parseId(params.sessionId, 'session'));
  respondUnless(session?.courseId === course.id, 404, 'No such session in this course.');
  const fallback = computerStrategyOf(session.design);
  return { course, role, session: { id: session.id, treatment: session.treatment }, fallback, serverNow: Date.now() };
}

export default function Floor({ loaderData }: Route.ComponentProps) {
  const { course, role, session, fallback } = loaderData;
  const { view: floor, connected, error, ask } = useSessionView(session.id, 'floor', null);
  // Names behind the pseudonyms, loaded on demand (the session-names resource route).
  const namesFetcher = useFetcher<typeof namesLoader>();
  const [namesShown, setNamesShown] = useState(false);
  const names = namesShown && namesFetcher.data && 'names' in namesFetcher.data ? namesFetcher.data.names : null;
  const [strategy, setStrategy] = useState(fallback);
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const [, setTick] = useState(0);
  const offset = loaderData.serverNow - Date.now();
  useEffect(() => {
    const t = setInterval(() => setTick((x) => x + 1), 1000);
    return () => clearInterval(t);
  }, []);
  const now = Date.now() + offset;
  // Nudges and hand-overs mean something only while rounds are being played.
  const live = floor?.status === 'running' || floor?.status === 'paused';

  const showNames = () => {
    if (names) return setNamesShown(false);
    setNamesShown(true);
    void namesFetcher.load(`/courses/${course.id}/sessions/${session.id}/names`);
  };
  const act = async (participantId: string, action: 'nudge' | 'hand-to-computer' | 'remove', label: string) => {
    if (action !== 'nudge' && !window.confirm(`${label}? The participant is told.`)) return;
    const res = await ask((s) =>
      s.emitWithAck('participant:act', {
        sessionId: session.id,
        participantId,
        action,
        ...(action === 'hand-to-computer' ? { strategy } : {}),
      }),
    );
    setMessage(res.ok ? { ok: true, text: `${label}: done.` } : { ok: false, text: res.message });
  };
  const who = (s: FloorSeatView) => {
    if (s.computer) return `Computer (${s.computer.strategy})${s.pseudonym ? ` for ${s.pseudonym}` : ''}`;
    const n = s.participantId && names?.[s.participantId];
    return n ? `${s.pseudonym} · ${n.name ?? n.email}` : (s.pseudonym ?? '—');
  };

  return (
    <>
      <PageHeader
        title={`Floor · session #${session.id}`}
        eyebrow={
          <CourseCrumbs course={course} trail={[{ to: `/courses/${course.id}/sessions/${session.id}`, label: `Session #${session.id}` }]} />
        }
      >
        <Button variant="secondary" onClick={showNames} aria-pressed={names !== null}>
          {names ? 'Hide names' : 'Show names'}
        </Button>
      </PageHeader>
      <div className="mb-4 flex flex-wrap items-center gap-4 text-sm" aria-live="polite">
        <span>
          <span aria-hidden="true">{connected ? '●' : '○'} </span>
          {connected ? 'Live' : 'Connecting…'}
        </span>
        {floor ? (
          <>
            <span>
              <SessionStatusWord status={floor.status} />
            </span>
            <span className="num">
              Supergame {floor.supergame || '—'} of {floor.supergames} · {floor.counts.pairsDone}/{floor.counts.pairs} pairs done ·{' '}
              {floor.counts.connected}/{floor.counts.joined} connected
            </span>
          </>
        ) : null}
        <label className="flex items-center gap-2">
          Computer partner plays
          <select
            value={strategy}
            onChange={(e) => setStrategy(e.target.value)}
            className="min-h-9 rounded border border-slate-300 bg-white px-2"
          >
            {LIBRARY.map((a) => (
              <option key={a.id} value={a.id}>
                {a.id}
              </option>
            ))}
          </select>
        </label>
      </div>
      {error ? <Notice tone="error">{error}</Notice> : null}
      {message ? <Notice tone={message.ok ? 'ok' : 'error'}>{message.text}</Notice> : null}
      {floor && floor.alerts.length ? (
        <section aria-labelledby="alerts" className="my-4 rounded-lg border border-amber-300 bg-warn-50 p-3">
          <h2 id="alerts" className="mb-1 font-semibold">
            <span aria-hidden="true">⚠ </span>Alerts
          </h2>
          <ul className="flex flex-wrap gap-x-6 gap-y-1 text-sm">
            {floor.alerts.map((a) => (
              <li key={a.participantId + a.kind}>
                {a.pseudonym}: {a.kind === 'slow' ? 'slow to choose' : 'disconnected'}
              </li>
            ))}
          </ul>
        </section>
      ) : null}
      {floor ? (
        <div className="relative overflow-x-auto rounded-lg border border-slate-200 bg-white">
          <table className="w-full text-left text-sm">
            <caption className="sr-only">Pairs of the current supergame, one row per seat</caption>
            <thead className="border-b border-slate-200 bg-slate-50 text-slate-700">
              <tr>
                <th scope="col" className="px-3 py-2">
                  Pair
                </th>
                <th scope="col" className="px-3 py-2 text-right">
                  Round
                </th>
                <th scope="col" className="px-3 py-2">
                  Seat
                </th>
                <th scope="col" className="px-3 py-2">
                  Chosen · connection
                </th>
                <th scope="col" className="px-3 py-2 text-right">
                  Waiting
                </th>
                <th scope="col" className="px-3 py-2">
                  <span className="sr-only">Actions</span>
                </th>
              </tr>
            </thead>
            {/* One row per seat, so each seat's buttons sit on its own line; the pair's cells span both. */}
            {floor.pairs.map((p) => (
              <tbody key={p.pairId} className="border-b border-slate-200" data-testid="floor-pair">
                {p.seats.map((s, i) => (
                  <tr key={i} className={i === 0 ? 'align-middle' : 'border-t border-slate-100 align-middle'}>
                    {i === 0 ? (
                      <>
                        <th scope="rowgroup" rowSpan={2} className="px-3 py-2 align-top font-semibold whitespace-nowrap">
                          Pair {p.number}
                        </th>
                        <td rowSpan={2} className="num px-3 py-2 text-right align-top">
                          {p.done ? 'done' : p.round}
                        </td>
                      </>
                    ) : null}
                    <td className="px-3 py-2">
                      <span className="font-semibold" data-testid="seat-name">
                        {who(s)}
                      </span>
                    </td>
                    <td className="px-3 py-2">
                      <span className="flex flex-wrap items-center gap-x-3 gap-y-1">
                        <span>{s.hasChosen ? '✓ chosen' : p.done ? '' : '… choosing'}</span>
                        {s.connected === false ? <span className="font-semibold text-danger-600">✕ disconnected</span> : null}
                        {s.timeouts ? (
                          <span className="text-slate-600">
                            {s.timeouts} timeout{s.timeouts > 1 ? 's' : ''}
                          </span>
                        ) : null}
                      </span>
                    </td>
                    {i === 0 ? (
                      <td rowSpan={2} className="num px-3 py-2 text-right align-top" title="Since the first of the pair chose">
                        {p.waitingSince && !p.done ? `${Math.max(0, Math.round((now - p.waitingSince) / 1000))} s` : '—'}
                      </td>
                    ) : null}
                    <td className="px-3 py-1">
                      {live && s.participantId && !s.computer ? (
                        <div className="flex flex-wrap gap-1">
                          <button
                            className="min-h-9 rounded px-2 font-semibold text-accent-700 hover:bg-accent-50"
                            onClick={() => act(s.participantId!, 'nudge', `Nudge ${s.pseudonym}`)}
                          >
                            Nudge<span className="sr-only"> {s.pseudonym}</span>
                          </button>
                          <button
                            className="min-h-9 rounded px-2 font-semibold text-slate-700 hover:bg-slate-100"
                            onClick={() =>
                              act(s.participantId!, 'hand-to-computer', `Hand ${s.pseudonym} to a computer partner (${strategy})`)
                            }
                          >
                            Hand to computer<span className="sr-only"> {s.pseudonym}</span>
                          </button>
                          {role === 'instructor' ? (
                            <button
                              className="min-h-9 rounded px-2 font-semibold text-danger-600 hover:bg-danger-50"
                              onClick={() => act(s.participantId!, 'remove', `Remove ${s.pseudonym}`)}
                            >
                              Remove<span className="sr-only"> {s.pseudonym}</span>
                            </button>
                          ) : null}
                        </div>
                      ) : null}
                    </td>
                  </tr>
                ))}
              </tbody>
            ))}
          </table>
          {floor.pairs.length === 0 ? <p className="p-4 text-slate-600">No pairs yet: the session has not started.</p> : null}
        </div>
      ) : null}
      {floor && floor.others.length ? (
        <section aria-labelledby="others" className="mt-4">
          <h2 id="others" className="mb-2 font-semibold">
            Not in a pair
          </h2>
          <ul className="flex flex-wrap gap-2 text-sm">
            {floor.others.map((o) => (
              <li key={o.participantId} className="rounded border border-slate-200 bg-white px-2 py-1">
                {o.pseudonym}
                {names?.[o.participantId] ? ` · ${names[o.participantId].name ?? names[o.participantId].email}` : ''} —{' '}
                {o.why.replace(/-/g, ' ')}
                {o.connected ? '' : ' · ✕ disconnected'}
                {role === 'instructor' && floor.status === 'open' && o.why === 'lobby' ? (
                  <button
                    className="ml-2 min-h-9 rounded px-2 font-semibold text-danger-600 hover:bg-danger-50"
                    onClick={() => act(o.participantId, 'remove', `Remove ${o.pseudonym}`)}
                  >
                    Remove<span className="sr-only"> {o.pseudonym}</span>
                  </button>
                ) : null}
              </li>
            ))}
          </ul>
        </section>
      ) : null}
    </>
  );
}

export const meta: Route.MetaFunction = ({ data }) => [{ title: `Floor · session #${data?.session.id ?? ''} · Parley` }];
