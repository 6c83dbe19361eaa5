// The one mapping of a stored session row to the session the app works with: every model that
// reads sessions selects `sessionColumns` and maps each row with `toSession`. The frozen design
// is validated by its column (drizzle/schema.ts, `designJson`), so it arrives as a Design.
import type { Design } from '#app/lib/design';
import { sessions } from '#drizzle/schema';

export const sessionColumns = {
  id: sessions.id,
  courseId: sessions.courseId,
  designId: sessions.designId,
  treatment: sessions.treatment,
  params: sessions.params,
  seed: sessions.seed,
  status: sessions.status,
  joinCode: sessions.joinCode,
  admission: sessions.admission,
  emailDomain: sessions.emailDomain,
  simulated: sessions.simulated,
  currentSupergame: sessions.currentSupergame,
  createdAt: sessions.createdAt,
  startedAt: sessions.startedAt,
  completedAt: sessions.completedAt,
};

type SessionRecord = Pick<typeof sessions.$inferSelect, keyof typeof sessionColumns>;

/** A session as the app sees it (product.md "Session"): the stored row, its design by name. */
export interface Session extends Omit<SessionRecord, 'params'> {
  /** the design frozen into the session when it was made */
  design: Design;
}

export function toSession({ params, ...row }: SessionRecord): Session {
  return { ...row, design: params };
}
