// The demo scenario (product.md): an invented course at an invented college with invented people.
// Nothing here describes a real person or institution.
import { and, eq } from 'drizzle-orm';
import type { MySql2Database } from 'drizzle-orm/mysql2';
import { type DesignInput, designSchema } from '#app/lib/design';
import { generateInstructions } from '#app/lib/instructions';
import { participantKeyOf, writeEffects } from '#app/models/live.server';
import * as schema from '#drizzle/schema';
import { DEMO_MIXTURES, simulateSession } from './simulate';

const { users, courses, courseMembers, designs, sessions } = schema;

export const DEMO_COURSE = {
  title: 'ECON 214 Strategy and Markets',
  institution: 'Halvorsen College (fictional)',
  term: 'Spring 2027',
};

export const DEMO_STAFF = [
  { email: 'r.okafor@halvorsen.example', name: 'Rosa Okafor (demo instructor)', role: 'instructor' },
  { email: 'j.lindqvist@halvorsen.example', name: 'Jonas Lindqvist (demo assistant)', role: 'assistant' },
  { email: 'm.achterberg@halvorsen.example', name: 'Mira Achterberg (demo researcher)', role: 'researcher' },
] as const;

export const DEMO_ADMIN = { email: 'admin@halvorsen.example', name: 'Site admin (demo)' };

const FIRST = [
  'Ada',
  'Bram',
  'Cleo',
  'Dario',
  'Elif',
  'Farid',
  'Greta',
  'Hugo',
  'Ines',
  'Jalen',
  'Kaia',
  'Luca',
  'Maren',
  'Nika',
  'Otto',
  'Priya',
  'Quinn',
  'Rafa',
  'Sina',
  'Tomas',
];
const LAST = ['Arden', 'Brisk', 'Calloway', 'Dunmore', 'Eskel', 'Fairholm', 'Grove', 'Hollis', 'Ivers', 'Jessup'];

/** 40 invented participants: student01@… to student40@…, names drawn from invented lists. */
export function demoParticipants() {
  return Array.from({ length: 40 }, (_, i) => {
    const n = i + 1;
    return {
      email: `student${String(n).padStart(2, '0')}@halvorsen.example`,
      // i and i + 20 share a first name, so shift the surname for the second twenty: 40 distinct names.
      name: `${FIRST[i % FIRST.length]} ${LAST[(i * 7 + Math.floor(i / FIRST.length)) % LAST.length]}`,
      studentId: `HC27-${String(1000 + n)}`,
    };
  });
}

type Db = MySql2Database<typeof schema>;

async function upsertUser(db: Db, email: string, name: string) {
  await db.insert(users).values({ email, name }).onDuplicateKeyUpdate({ set: { name } });
  const [u] = await db.select({ id: users.id }).from(users).where(eq(users.email, email));
  return u.id;
}

/** Idempotent: running it twice leaves the same rows. */
export async function seedDemo(db: Db) {
  await upsertUser(db, DEMO_ADMIN.email, DEMO_ADMIN.name);
  const staffIds = new Map<string, number>();
  for (const s of DEMO_STAFF) staffIds.set(s.email, await upsertUser(db, s.email, s.name));
  const instructorId = staffIds.get(DEMO_STAFF[0].email)!;
  // The demo instructor may create courses (docs/decisions/023-who-creates-courses.md).
  await db.update(users).set({ mayCreateCourses: true }).where(eq(users.id, instructorId));

  let [course] = await db
    .select({ id: courses.id })
    .from(courses)
    .where(and(eq(courses.title, DEMO_COURSE.title), eq(courses.isDemo, true)));
  if (!course) {
    const [res] = await db.insert(courses).values({ ...DEMO_COURSE, isDemo: true, createdBy: instructorId });
    course = { id: res.insertId };
  }
  const member = async (userId: number, role: schema.CourseRole, studentId: string | null = null) =>
    db.insert(courseMembers).values({ courseId: course.id, userId, role, studentId }).onDuplicateKeyUpdate({ set: { role, studentId } });
  for (const s of DEMO_STAFF) await member(staffIds.get(s.email)!, s.role);
  for (const p of demoParticipants()) await member(await upsertUser(db, p.email, p.name), 'participant', p.studentId);
  for (const d of DEMO_DESIGNS) {
    const [exists] = await db
      .select({ id: designs.id })
      .from(designs)
      .where(and(eq(designs.courseId, course.id), eq(designs.name, d.name)));
    if (exists) continue;
    const params = designSchema.parse(d.params);
    await db.insert(designs).values({
      courseId: course.id,
      name: d.name,
      params: { ...params, instructions: generateInstructions(params) },
      createdBy: instructorId,
    });
  }
  await seedDemoSessions(db, course.id, instructorId);
  return { courseId: course.id };
}

/**
 * The two completed demo sessions (same payoffs, δ = 1/2 and δ = 7/8), simulated through the
 * session engine from the stated mixtures in seeds/simulate.ts, all 40 participants in each.
 */
async function seedDemoSessions(db: Db, courseId: number, instructorId: number) {
  const runs = [
    { design: DEMO_DESIGNS[0], mixture: DEMO_MIXTURES.short, seed: 2027_0303, rngSeed: 11, start: Date.UTC(2027, 2, 3, 10, 15) },
    { design: DEMO_DESIGNS[1], mixture: DEMO_MIXTURES.long, seed: 2027_0310, rngSeed: 12, start: Date.UTC(2027, 2, 10, 10, 15) },
  ];
  const people = demoParticipants();
  const userIds: string[] = [];
  for (const p of people) {
    const [u] = await db.select({ id: users.id }).from(users).where(eq(users.email, p.email));
    userIds.push(participantKeyOf(u.id));
  }
  for (const run of runs) {
    const [exists] = await db
      .select({ id: sessions.id })
      .from(sessions)
      .where(and(eq(sessions.courseId, courseId), eq(sessions.treatment, run.design.name), eq(sessions.simulated, true)));
    if (exists) continue;
    const [design] = await db
      .select({ id: designs.id, params: designs.params })
      .from(designs)
      .where(and(eq(designs.courseId, courseId), eq(designs.name, run.design.name)));
    const { params } = design;
    await db.transaction(async (tx) => {
      const [res] = await tx.insert(sessions).values({
        courseId,
        designId: design.id,
        treatment: run.design.name,
        params,
        seed: run.seed,
        status: 'draft',
        simulated: true,
        createdBy: instructorId,
        createdAt: new Date(run.start - 3600_000),
      });
      const sim = simulateSession({
        sessionId: String(res.insertId),
        design: params,
        seed: run.seed,
        participantIds: userIds,
        mixture: run.mixture,
        rngSeed: run.rngSeed,
        startMs: run.start,
      });
      await writeEffects(tx, res.insertId, sim.effects, instructorId);
    });
  }
}

/** Payoffs shared by the demo designs (invented; the shape of Dal Bó & Fréchette's with R = 40). */
const DEMO_PAYOFFS = { R: 40, S: 12, T: 50, P: 25 };

/** Three invented designs: the two of the completed demo sessions and one ready to open. */
export const DEMO_DESIGNS: { name: string; params: DesignInput }[] = [
  {
    name: 'Short horizon (δ = 1/2) — demo',
    params: {
      payoffs: DEMO_PAYOFFS,
      delta: 0.5,
      supergames: 20,
      roundSeconds: 15,
      oddCount: { kind: 'computer', strategy: 'TFT' },
      consent: true,
    },
  },
  {
    name: 'Long horizon (δ = 7/8) — demo',
    params: {
      payoffs: DEMO_PAYOFFS,
      delta: 0.875,
      supergames: 8,
      roundSeconds: 15,
      oddCount: { kind: 'computer', strategy: 'TFT' },
      consent: true,
    },
  },
  {
    name: 'Week 9 class run (δ = 3/4) — demo',
    params: {
      payoffs: DEMO_PAYOFFS,
      delta: 0.75,
      supergames: 12,
      roundSeconds: 20,
      oddCount: { kind: 'sit-out' },
      credit: { kind: 'participation', credit: 2, pointsScaleMax: 2000 },
    },
  },
];
