import type { SessionStatus } from '#realtime/engine/types';

/** Session states in words with an icon, so status never rests on colour alone. */
export const STATUS_WORDS: Record<SessionStatus, { word: string; icon: string }> = {
  draft: { word: 'Draft', icon: '○' },
  open: { word: 'Open for joining', icon: '◔' },
  running: { word: 'Running', icon: '▶' },
  paused: { word: 'Paused', icon: '❚❚' },
  complete: { word: 'Complete', icon: '✓' },
  archived: { word: 'Archived', icon: '▣' },
  cancelled: { word: 'Cancelled', icon: '⊘' },
};
