// Join codes are 6 characters from 32 (about 10⁹ codes): small enough that a script on the public
// /join page could walk them. Codes that match no open session are counted per network address
// and refused for a while past a limit; right codes never count (a lecture hall shares one
// address). Kept in memory: a restart forgetting the count is harmless. In cluster mode each
// process counts its own, so behind HAProxy's leastconn a network gets up to n × the allowance
// (docs/deploy.md says how to set JOIN_CODE_MISSES_PER_IP for n processes).
import { env } from './env.server';

export const JOIN_GUESS_WINDOW_MS = 15 * 60_000;
const misses = new Map<string, number[]>();

function recent(ip: string, now: number) {
  const list = (misses.get(ip) ?? []).filter((t) => t > now - JOIN_GUESS_WINDOW_MS);
  if (list.length) misses.set(ip, list);
  else misses.delete(ip);
  return list;
}

/** Seconds until this network may try another code, or null when it may now. */
export function joinGuessWait(ip: string, now = Date.now()): number | null {
  const list = recent(ip, now);
  if (list.length < env().JOIN_CODE_MISSES_PER_IP) return null;
  return Math.max(1, Math.ceil((list[0] + JOIN_GUESS_WINDOW_MS - now) / 1000));
}

/** A code that matched no open session. */
export function recordJoinMiss(ip: string, now = Date.now()) {
  const list = recent(ip, now);
  list.push(now);
  misses.set(ip, list);
  // Forget quiet networks now and then so the map stays small.
  if (misses.size > 10_000) for (const key of [...misses.keys()]) recent(key, now);
}
