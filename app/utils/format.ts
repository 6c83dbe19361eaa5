export function formatWait(seconds: number) {
  if (seconds < 90) return `${seconds} seconds`;
  return `${Math.ceil(seconds / 60)} minutes`;
}

export function formatDate(d: Date | string) {
  const date = typeof d === 'string' ? new Date(d) : d;
  return date.toLocaleDateString('en-GB', { year: 'numeric', month: 'short', day: 'numeric', timeZone: 'UTC' });
}

export const ROLE_WORDS = {
  instructor: 'Instructor',
  assistant: 'Assistant',
  researcher: 'Researcher',
  participant: 'Participant',
  admin: 'Site admin',
} as const;

/** A moment as people read a deadline: "2 Dec 2026, 15:00 UTC" (the server and every phone agree on UTC). */
export function formatDateTime(d: Date | string) {
  const date = typeof d === 'string' ? new Date(d) : d;
  const day = date.toLocaleDateString('en-GB', { year: 'numeric', month: 'short', day: 'numeric', timeZone: 'UTC' });
  const time = date.toLocaleTimeString('en-GB', { hour: '2-digit', minute: '2-digit', hour12: false, timeZone: 'UTC' });
  return `${day}, ${time} UTC`;
}
