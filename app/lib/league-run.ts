/**
 * A league's run from its design and entries to the numbers stored as its results: the exact
 * round-robin, the standings, the simulated version when asked, the evolution and the survivors
 * (app/lib/league.ts). Pure; the league-run job calls it on a worker thread
 * (league-worker.server.ts), the tests call it directly.
 */
import type { Automaton } from './automata';
import { evolve, roundRobin, simulatedRoundRobin, standings, survivors } from './league';
import type { LeagueDesign, LeagueResults, ResultEntry } from './league-design';
import { readStrategyFile, type StrategyFile } from './strategy-file';

/** The automaton of a stored entry (0-based states, app/lib/automata.ts). */
export function automatonOfEntry(entry: { strategy: StrategyFile }): Automaton {
  const read = readStrategyFile(entry.strategy);
  // stored entries were checked when saved; a failure here is a bug, not the caller's input
  if (!read.ok) throw new Error(`A stored league entry is not a valid strategy: ${read.issues[0]?.message}`);
  return read.automaton;
}

export function computeLeagueResults(design: LeagueDesign, entries: readonly ResultEntry[], now = () => Date.now()): LeagueResults {
  const t0 = now();
  const automata = entries.map(automatonOfEntry);
  const settings = { game: design.payoffs, delta: design.delta, epsilon: design.epsilon };
  const perRound = roundRobin(automata, settings);
  let simulated: LeagueResults['simulated'] = null;
  if (design.matches >= 2 && automata.length > 0) {
    const sim = simulatedRoundRobin(automata, settings, { matches: design.matches, seed: design.seed });
    const n = automata.length;
    // an entry's simulated score is the mean of its n pair estimates; pairs draw from independent
    // substreams, so its standard error is √(Σ se²)/n
    const scores = sim.perRound.map((row, i) => ({
      score: row.reduce((s, v) => s + v, 0) / n,
      se: Math.sqrt(sim.standardError[i].reduce((s, v) => s + v * v, 0)) / n,
    }));
    simulated = { ...sim, scores };
  }
  const evolution = automata.length > 0 ? evolve(perRound, design.generations) : { shares: [], background: 0 };
  return {
    version: 1,
    design,
    entries: [...entries],
    perRound,
    standings: standings(perRound),
    simulated,
    evolution,
    survivors: automata.length > 0 ? survivors(evolution) : [],
    computedAt: new Date().toISOString(),
    ms: now() - t0,
  };
}
