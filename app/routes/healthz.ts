import { databaseAnswers } from '#app/utils/db.server';
import { runnerIfStarted } from '#app/utils/runner.server';

// 200 only when MariaDB answers and the live runner has not lost it: used by `npm start`, tests
// and load balancers. `live: 'degraded'` while the runner refuses choices for want of MariaDB
// (it may answer this probe before the runner's own probe has noticed the recovery).
export async function loader() {
  const up = await databaseAnswers();
  const live = runnerIfStarted()?.health;
  const degraded = live ? !live.ok : false;
  const ok = up && !degraded;
  return Response.json(
    {
      ok,
      database: up ? 'up' : 'down',
      live: degraded ? 'degraded' : 'ok',
      ...(live?.lostSince ? { lostSince: new Date(live.lostSince).toISOString() } : {}),
    },
    { status: ok ? 200 : 503, headers: { 'Cache-Control': 'no-store' } },
  );
}
