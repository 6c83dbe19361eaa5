// A completed session written straight into the tables (no engine), of any size: for export
// tests (consent, computer partners) and for `npm run bench:export` (100k rows). Its people are
// invented (…@synthetic.parley.test) and it is labelled simulated. `remove()` deletes it all.
import { eq, inArray } from 'drizzle-orm';
import type { MySql2Database } from 'drizzle-orm/mysql2';
import { type DesignInput, designSchema } from '#app/lib/design';
import { drawRule } from '#app/lib/draws';
import { mulberry32 } from '#app/lib/prng';
import * as schema from '#drizzle/schema';

type Db = MySql2Database<typeof schema>;

export interface SyntheticOptions {
  courseId: number;
  createdBy: number;
  participants: number;
  /** realised length of each supergame */
  lengths: number[];
  design?: Partial<DesignInput>;
  /** research consent per participant index (default: not asked) */
  consent?: (index: number) => 0 | 1 | null;
  /** course member with a student id, so identified exports have one */
  enrol?: boolean;
  seed?: number;
  tag?: string;
  /** the session's treatment (the design's name); default "Synthetic δ = … (simulated)" */
  treatment?: string;
  /** each participant's name (default "Synthetic Person N") */
  name?: (index: number) => string;
}

const BATCH = 5000;

export async function insertSyntheticSession(db: Db, opts: SyntheticOptions) {
  const rand = mulberry32(opts.seed ?? 7);
  const tag = opts.tag ?? `${process.pid}-${Date.now().toString(36)}`;
  const design = designSchema.parse({
    payoffs: { R: 40, S: 12, T: 50, P: 25 },
    delta: 0.75,
    supergames: opts.lengths.length,
    roundSeconds: 15,
    oddCount: { kind: 'computer', strategy: 'TFT' },
    ...opts.design,
  });
  const start = Date.UTC(2027, 3, 7, 9, 0);

  const emails = Array.from({ length: opts.participants }, (_, i) => `p${i + 1}-${tag}@synthetic.parley.test`);
  await db.insert(schema.users).values(emails.map((email, i) => ({ email, name: opts.name?.(i) ?? `Synthetic Person ${i + 1}` })));
  const people = await db
    .select({ id: schema.users.id, email: schema.users.email })
    .from(schema.users)
    .where(inArray(schema.users.email, emails));
  const idOf = new Map(people.map((p) => [p.email, p.id]));
  const userIds = emails.map((e) => idOf.get(e)!);
  if (opts.enrol) {
    await db
      .insert(schema.courseMembers)
      .values(
        userIds.map((userId, i) => ({ courseId: opts.courseId, userId, role: 'participant' as const, studentId: `SYN-${tag}-${i + 1}` })),
      );
  }

  const [res] = await db.insert(schema.sessions).values({
    courseId: opts.courseId,
    treatment: opts.treatment ?? `Synthetic δ = ${design.delta} (simulated)`,
    params: design,
    seed: opts.seed ?? 7,
    status: 'complete',
    simulated: true,
    createdBy: opts.createdBy,
    createdAt: new Date(start - 3600_000),
    startedAt: new Date(start),
  });
  const sessionId = res.insertId;
  const keys = userIds.map(String);
  await db.insert(schema.sessionParticipants).values(
    keys.map((key, i) => ({
      sessionId,
      userId: userIds[i],
      participantKey: key,
      pseudonym: `P-${String(i + 1).padStart(3, '0')}`,
      seq: i + 1,
      joinedAtMs: start - 60_000 + i * 1000,
      consent: opts.consent?.(i) ?? null,
    })),
  );

  const { max, cutoff } = drawRule(design.delta);
  let seq = opts.participants;
  let now = start;
  let pending: (typeof schema.choices.$inferInsert)[] = [];
  const flush = async () => {
    if (pending.length) await db.insert(schema.choices).values(pending);
    pending = [];
  };
  for (const [index, length] of opts.lengths.entries()) {
    const supergame = index + 1;
    // genuine-looking draws: ≤ cut-off until the last round, then above it
    const draws = Array.from({ length }, (_, r) =>
      r < length - 1 ? 1 + Math.floor(rand() * cutoff) : cutoff + 1 + Math.floor(rand() * (max - cutoff)),
    );
    await db.insert(schema.supergameDraws).values({ sessionId, supergame, draws, length, roundsPlayed: length });
    // a new random matching every supergame; an odd one out meets the disclosed computer partner
    const order = [...keys].sort(() => rand() - 0.5);
    const pairs: [string, string | null][] = [];
    for (let i = 0; i < order.length; i += 2) pairs.push([order[i], order[i + 1] ?? null]);
    await db.insert(schema.sessionPairs).values(
      pairs.map(([a, b], i) => ({
        sessionId,
        supergame,
        pairId: `s${supergame}-p${i + 1}`,
        seat0: a,
        seat1: b,
        computerStrategy: b ? null : 'TFT',
      })),
    );
    for (let round = 1; round <= length; round++) {
      for (const [i, [a, b]] of pairs.entries()) {
        for (const seat of [0, 1] as const) {
          const key = seat === 0 ? a : b;
          now += 37;
          const timeout = key !== null && rand() < 0.02;
          pending.push({
            sessionId,
            seq: ++seq,
            supergame,
            round,
            pairId: `s${supergame}-p${i + 1}`,
            seat,
            participantKey: key,
            action: rand() < 0.55 ? 'C' : 'D',
            source: key === null ? 'computer' : timeout ? 'timeout' : 'player',
            strategy: key === null ? 'TFT' : null,
            clientChoiceId: null,
            atMs: now,
            decisionMs: key === null ? 0 : Math.floor(rand() * 14_000),
          });
          if (pending.length >= BATCH) await flush();
        }
      }
    }
  }
  await flush();
  await db
    .update(schema.sessions)
    .set({ completedAt: new Date(now), currentSupergame: opts.lengths.length })
    .where(eq(schema.sessions.id, sessionId));

  return {
    sessionId,
    userIds,
    emails,
    async remove() {
      await db.delete(schema.sessions).where(eq(schema.sessions.id, sessionId));
      await db.delete(schema.courseMembers).where(inArray(schema.courseMembers.userId, userIds));
      await db.delete(schema.users).where(inArray(schema.users.id, userIds));
    },
  };
}
