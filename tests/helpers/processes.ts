// Small facts about processes, for tests that start and stop real ones.

/** Whether a process with this pid exists (signal 0 checks without sending anything). Never pass 0. */
export function alive(pid: number): boolean {
  if (!Number.isInteger(pid) || pid <= 0) return false;
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}
