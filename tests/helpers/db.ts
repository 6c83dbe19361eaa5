// Direct access to the test database for factories and for checking what was (not) written.
import { drizzle } from 'drizzle-orm/mysql2';
import mysql from 'mysql2/promise';
import * as schema from '#drizzle/schema';
import type { CourseRole } from '#app/utils/roles';

let pool: mysql.Pool | undefined;

export function testDb() {
  pool ??= mysql.createPool({ uri: process.env.DATABASE_URL!, connectionLimit: 4, timezone: 'Z' });
  return drizzle(pool, { schema, mode: 'default' });
}

export async function closeTestDb() {
  await pool?.end();
  pool = undefined;
}

export async function createUser(email: string, name: string | null = null) {
  const [res] = await testDb().insert(schema.users).values({ email, name });
  return res.insertId;
}

/** A course with the given members (user ids by role); the first instructor creates it. */
export async function createCourse(title: string, members: { userId: number; role: CourseRole }[]) {
  const creator = members.find((m) => m.role === 'instructor') ?? members[0];
  const [res] = await testDb().insert(schema.courses).values({ title, createdBy: creator.userId });
  const courseId = res.insertId;
  if (members.length)
    await testDb()
      .insert(schema.courseMembers)
      .values(members.map((m) => ({ ...m, courseId })));
  return courseId;
}

/** An account allowed to create courses, as a site admin would grant it (docs/decisions/023). */
export async function createCourseCreator(email: string) {
  const [res] = await testDb().insert(schema.users).values({ email, mayCreateCourses: true });
  return res.insertId;
}
