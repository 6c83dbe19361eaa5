import { useEffect } from 'react';
import { useFetcher } from 'react-router';
import type { CheckRow as Row } from '#app/models/comprehension.server';

const POLL_MS = 5000;

const since = (ms: number) => {
  const s = Math.max(0, Math.round(ms / 1000));
  return s < 60 ? `${s} s` : `${Math.floor(s / 60)} min`;
};

/**
 * The Conductor's view of the comprehension check: who has the questions open and has not passed,
 * with their attempts and the question that held them up last, so an assistant can walk over.
 * Polled: the check happens before the phone joins, outside the live session's socket.
 */
export function ComprehensionStatus({ courseId, sessionId, live }: { courseId: number; sessionId: number; live: boolean }) {
  const fetcher = useFetcher<{ enabled: boolean; rows: Row[]; now: number }>();
  const url = `/courses/${courseId}/sessions/${sessionId}/comprehension`;
  const { load } = fetcher;
  useEffect(() => {
    load(url);
    if (!live) return;
    const t = setInterval(() => {
      if (document.visibilityState === 'visible') load(url);
    }, POLL_MS);
    return () => clearInterval(t);
  }, [load, url, live]);
  const rows = fetcher.data?.rows ?? [];
  const stuck = rows.filter((r) => !r.passed);
  const passed = rows.length - stuck.length;
  const now = fetcher.data?.now ?? 0;
  return (
    <section aria-labelledby="check-title" className="rounded-lg border border-slate-200 bg-white p-4" data-testid="comprehension-status">
      <h2 id="check-title" className="mb-1 text-lg font-semibold">
        Comprehension check
      </h2>
      {fetcher.data ? (
        <>
          <p className="text-sm text-slate-700" aria-live="polite">
            <span className="num font-semibold">{passed}</span> passed · <span className="num font-semibold">{stuck.length}</span> not yet
          </p>
          {stuck.length ? (
            <ul className="mt-2 flex flex-col divide-y divide-slate-100 text-sm">
              {stuck.map((r) => (
                <li key={r.userId} className="py-2">
                  <span className="font-semibold break-words">{r.name}</span>
                  <span className="block text-slate-700">
                    {r.attempts === 0 ? 'reading the questions' : `${r.attempts} attempt${r.attempts === 1 ? '' : 's'}, not yet passed`}
                    {r.lastWrong.length ? ` — last wrong: ${r.lastWrong.join(', ')}` : ''} · {since(now - r.updatedAt)} ago
                  </span>
                </li>
              ))}
            </ul>
          ) : (
            <p className="mt-1 text-sm text-slate-600">Nobody is held up by the questions.</p>
          )}
        </>
      ) : (
        <p className="text-sm text-slate-600">Loading…</p>
      )}
    </section>
  );
}
