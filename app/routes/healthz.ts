import { databaseAnswers } from '#app/utils/db.server';
import { runnerIfStarted } from '#app/utils/runner.server';

// 200 only when MariaDB answers and the live runner has not lost it: used by `npm start`, tests
// and load balancers (HAProxy's `option httpchk` in cluster mode). `live: 'degraded'` while the
// runner refuses choices for want of MariaDB (it may answer this probe before the runner's own
// probe has noticed the recovery). In cluster mode also Redis and socket.io's adapter, and a
// `cluster` field: this process's member id, the members it sees, the sessions it holds. Redis
// down does not make it 503: every process shares that Redis, so HAProxy would take them all out
// at once, while each still serves pages and steps the sessions it owns (only events that must be
// forwarded, and broadcasts to other processes, wait for Redis).
export async function loader() {
  const runner = runnerIfStarted();
  const [up, cluster] = await Promise.all([databaseAnswers(), runner?.clusterHealth() ?? null]);
  const live = runner?.health;
  const degraded = live ? !live.ok : false;
  const ok = up && !degraded;
  return Response.json(
    {
      ok,
      database: up ? 'up' : 'down',
      live: degraded ? 'degraded' : 'ok',
      ...(live?.lostSince ? { lostSince: new Date(live.lostSince).toISOString() } : {}),
      ...(cluster
        ? {
            redis: cluster.redis ? 'up' : 'down',
            adapter: cluster.adapter ? 'up' : 'down',
            cluster: { member: cluster.member, members: cluster.members, sessionsHeld: cluster.sessionsHeld },
          }
        : {}),
    },
    { status: ok ? 200 : 503, headers: { 'Cache-Control': 'no-store' } },
  );
}
