import { relations, sql } from 'drizzle-orm';
import {
  bigint,
  customType,
  datetime,
  index,
  int,
  mysqlEnum,
  mysqlTable,
  uniqueIndex,
  varchar,
} from 'drizzle-orm/mysql-core';

import { COURSE_ROLES } from '../app/utils/roles';

export { COURSE_ROLES, type CourseRole } from '../app/utils/roles';

const createdAt = () =>
  datetime('created_at', { mode: 'date', fsp: 3 })
    .notNull()
    .default(sql`CURRENT_TIMESTAMP(3)`);

export const users = mysqlTable('users', {
  id: int('id').autoincrement().primaryKey(),
  email: varchar('email', { length: 254 }).notNull().unique(),
  name: varchar('name', { length: 120 }),
  createdAt: createdAt(),
  lastSignInAt: datetime('last_sign_in_at', { mode: 'date', fsp: 3 }),
});

export const courses = mysqlTable('courses', {
  id: int('id').autoincrement().primaryKey(),
  title: varchar('title', { length: 160 }).notNull(),
  institution: varchar('institution', { length: 160 }),
  term: varchar('term', { length: 60 }),
  /** marks demo data, so every page that shows it can say it is invented */
  isDemo: int('is_demo').notNull().default(0),
  createdBy: int('created_by')
    .notNull()
    .references(() => users.id),
  createdAt: createdAt(),
  archivedAt: datetime('archived_at', { mode: 'date', fsp: 3 }),
});

export const courseMembers = mysqlTable(
  'course_members',
  {
    id: int('id').autoincrement().primaryKey(),
    courseId: int('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    userId: int('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    role: mysqlEnum('role', COURSE_ROLES).notNull(),
    studentId: varchar('student_id', { length: 60 }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('course_members_course_user').on(t.courseId, t.userId), index('course_members_user').on(t.userId)],
);

export const invitations = mysqlTable(
  'invitations',
  {
    id: int('id').autoincrement().primaryKey(),
    courseId: int('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    email: varchar('email', { length: 254 }).notNull(),
    role: mysqlEnum('role', COURSE_ROLES).notNull(),
    /** SHA-256 of the token in the e-mailed link; the token itself is never stored */
    tokenHash: varchar('token_hash', { length: 64 }).notNull().unique(),
    invitedBy: int('invited_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
    expiresAt: datetime('expires_at', { mode: 'date', fsp: 3 }).notNull(),
    acceptedAt: datetime('accepted_at', { mode: 'date', fsp: 3 }),
    revokedAt: datetime('revoked_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [index('invitations_course').on(t.courseId), index('invitations_email').on(t.email)],
);

/** Sign-in events used for rate limits and attempt counting (kept short: pruned after a day). */
export const authEvents = mysqlTable(
  'auth_events',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    kind: mysqlEnum('kind', ['code-request', 'code-failure', 'sign-in']).notNull(),
    email: varchar('email', { length: 254 }).notNull(),
    ip: varchar('ip', { length: 64 }).notNull(),
    createdAt: createdAt(),
  },
  (t) => [index('auth_events_email').on(t.kind, t.email, t.createdAt), index('auth_events_ip').on(t.kind, t.ip, t.createdAt)],
);

/** JSON kept as text: MariaDB's JSON is LONGTEXT, and we parse and validate it ourselves. */
const jsonText = <T>(name: string) =>
  customType<{ data: T; driverData: string }>({
    dataType: () => 'longtext',
    toDriver: (value) => JSON.stringify(value),
    fromDriver: (value) => JSON.parse(value) as T,
  })(name);

/**
 * A design: a saved parameter set of a course (product.md "Design"); exports call it treatment.
 * `params` holds the validated design (app/lib/design.ts); sessions copy it when they open.
 */
export const designs = mysqlTable(
  'designs',
  {
    id: int('id').autoincrement().primaryKey(),
    courseId: int('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    name: varchar('name', { length: 120 }).notNull(),
    params: jsonText<unknown>('params').notNull(),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
    updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
    archivedAt: datetime('archived_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [index('designs_course').on(t.courseId)],
);

/** Strategies a course built in the strategy checker (automata, app/lib/automata.ts). */
export const courseStrategies = mysqlTable(
  'course_strategies',
  {
    id: int('id').autoincrement().primaryKey(),
    courseId: int('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    /** short name, unique in the course and distinct from the library's */
    code: varchar('code', { length: 24 }).notNull(),
    name: varchar('name', { length: 120 }).notNull(),
    states: jsonText<unknown>('states').notNull(),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex('course_strategies_code').on(t.courseId, t.code)],
);

export const usersRelations = relations(users, ({ many }) => ({ memberships: many(courseMembers) }));
export const coursesRelations = relations(courses, ({ many }) => ({ members: many(courseMembers) }));
export const courseMembersRelations = relations(courseMembers, ({ one }) => ({
  course: one(courses, { fields: [courseMembers.courseId], references: [courses.id] }),
  user: one(users, { fields: [courseMembers.userId], references: [users.id] }),
}));
