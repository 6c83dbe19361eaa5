// A session's state in words, with its icon hidden from screen readers: never colour alone
// (product.md "Look"). One place for the pages that show it (Conductor, Floor, sessions, big
// screen, debrief chooser).
import { STATUS_WORDS } from '#app/utils/session-words';
import type { SessionStatus } from '#realtime/engine/types';

export function SessionStatusWord({ status }: { status: SessionStatus }) {
  const w = STATUS_WORDS[status];
  return (
    <>
      <span aria-hidden="true">{w.icon} </span>
      {w.word}
    </>
  );
}
