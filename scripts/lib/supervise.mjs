// `npm start` keeps Parley running: when the server process dies (any signal, any exit code) it
// says so and starts it again — sessions resume from the database — unless it died too often in a
// short window (a crash at start-up, say), then it gives up so the caller can stop everything and
// exit non-zero instead of staying up with Parley dead. Plain Node: no dependencies.

/** How a process ended, in words: "was killed by SIGKILL", "exited with code 1". */
export function howItEnded(code, signal) {
  return signal ? `was killed by ${signal}` : `exited with code ${code}`;
}

/**
 * Starts `spawn()` and restarts it whenever it ends, at most `maxRestarts` times within any
 * `windowMs`; one more death in the window calls `onGiveUp(reason)`. `stop()` ends it for good
 * (no restart) and resolves when the current process has exited.
 */
export function supervise({
  name,
  spawn,
  maxRestarts = 3,
  windowMs = 60_000,
  delayMs = 500,
  say = () => {},
  onRestart = () => {},
  onGiveUp,
  now = Date.now,
}) {
  let child = spawn();
  let stopping = false;
  const restarts = [];

  const watch = (c) => {
    c.once('exit', (code, signal) => {
      if (stopping) return;
      const why = howItEnded(code, signal);
      // Ctrl-C reaches the whole process group: let our own signal handler mark the stop first.
      setTimeout(() => {
        if (stopping) return;
        const t = now();
        while (restarts.length && restarts[0] <= t - windowMs) restarts.shift();
        if (restarts.length >= maxRestarts) {
          stopping = true;
          onGiveUp(`${name} ${why}, after ${restarts.length} restart(s) within ${Math.round(windowMs / 1000)} s`);
          return;
        }
        restarts.push(t);
        say(`${name} ${why}; restarting it (${restarts.length} of ${maxRestarts} within ${Math.round(windowMs / 1000)} s)`);
        child = spawn();
        watch(child);
        onRestart(child);
      }, delayMs);
    });
  };
  watch(child);

  return {
    get child() {
      return child;
    },
    get restarts() {
      return restarts.length;
    },
    stop(signal = 'SIGTERM') {
      stopping = true;
      const c = child;
      if (c.exitCode !== null || c.signalCode !== null) return Promise.resolve();
      return new Promise((resolve) => {
        c.once('exit', () => resolve());
        c.kill(signal);
      });
    },
  };
}
