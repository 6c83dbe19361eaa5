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
