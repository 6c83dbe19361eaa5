import { relations, sql } from 'drizzle-orm';
import {
  type AnyMySqlColumn,
  bigint,
  boolean,
  customType,
  datetime,
  index,
  int,
  mysqlEnum,
  mysqlTable,
  primaryKey,
  text,
  uniqueIndex,
  varchar,
} from 'drizzle-orm/mysql-core';

import { CHOICE_SOURCES } from '#app/lib/choice-panel';
import { type Design, designSchema } from '#app/lib/design';
import {
  LEAGUE_RUN_STATUSES,
  LEAGUE_STATES,
  type LeagueDesign,
  leagueDesignSchema,
  type LeagueResults,
  leagueResultsSchema,
  leagueStrategySchema,
} from '#app/lib/league-design';
import type { StrategyFile } from '#app/lib/strategy-file';
import { COURSE_ROLES } from '#app/utils/roles';

export { COURSE_ROLES, type CourseRole } from '#app/utils/roles';

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
  /** a site admin granted this account the right to create courses
   * (docs/decisions/023-who-creates-courses.md) */
  mayCreateCourses: boolean('may_create_courses').notNull().default(false),
});

export const courses = mysqlTable('courses', {
  id: int('id').autoincrement().primaryKey(),
  title: varchar('title', { length: 160 }).notNull(),
  institution: varchar('institution', { length: 160 }),
  term: varchar('term', { length: 60 }),
  /** marks demo data, so every page that shows it can say it is invented */
  isDemo: boolean('is_demo').notNull().default(false),
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
    /** the name this course's roster gives the person; never copied to users.name, so one
     * course's roster cannot rename someone in another course */
    name: varchar('name', { length: 120 }),
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
    /** when its mail went out; null = not sent (the mail failed), shown with a Resend button.
     * The default only fills rows that existed before the column: those were sent. Inserts set
     * null explicitly and the sender fills it in. */
    sentAt: datetime('sent_at', { mode: 'date', fsp: 3 }).default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [index('invitations_course').on(t.courseId), index('invitations_email').on(t.email)],
);

/**
 * Invitation and roster mails a course sent, for the daily cap per course
 * (INVITES_PER_COURSE_PER_DAY). A row is written before the mail goes out and deleted if it fails.
 */
export const courseMails = mysqlTable(
  'course_mails',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    courseId: int('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    kind: mysqlEnum('kind', ['invitation', 'roster']).notNull(),
    email: varchar('email', { length: 254 }).notNull(),
    sentBy: int('sent_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [index('course_mails_course').on(t.courseId, t.createdAt)],
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

/**
 * Every sign-in code Parley e-mailed, bound to the address it went to. The sign-in library keeps the
 * pending e-mail in a cookie the browser can edit, so this row, not the cookie, decides whose code it
 * is (docs/decisions/024). Keyed by the SHA-256 of the encrypted code data the library puts in that
 * cookie; the code itself is never stored. Also the ledger for the code-request limits.
 */
export const signInCodes = mysqlTable(
  'sign_in_codes',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    tokenHash: varchar('token_hash', { length: 64 }).notNull().unique(),
    email: varchar('email', { length: 254 }).notNull(),
    ip: varchar('ip', { length: 64 }).notNull(),
    createdAt: createdAt(),
    expiresAt: datetime('expires_at', { mode: 'date', fsp: 3 }).notNull(),
    /** wrong codes typed against this one; at the limit it no longer works */
    failures: int('failures').notNull().default(0),
    /** a code (or its link) signs in once */
    usedAt: datetime('used_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [index('sign_in_codes_email').on(t.email, t.createdAt), index('sign_in_codes_ip').on(t.ip, t.createdAt)],
);

/**
 * Sign-ins kept on the server: the signed cookie carries only a random token whose SHA-256 is the id
 * here, so signing out (here or everywhere) really ends it.
 */
export const authSessions = mysqlTable(
  'auth_sessions',
  {
    id: varchar('id', { length: 64 }).primaryKey(),
    userId: int('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    createdAt: createdAt(),
    lastSeenAt: datetime('last_seen_at', { mode: 'date', fsp: 3 }).notNull(),
    expiresAt: datetime('expires_at', { mode: 'date', fsp: 3 }).notNull(),
    ip: varchar('ip', { length: 64 }).notNull(),
    userAgent: varchar('user_agent', { length: 255 }),
  },
  (t) => [index('auth_sessions_user').on(t.userId), index('auth_sessions_expires').on(t.expiresAt)],
);

/** JSON kept as text: MariaDB's JSON is LONGTEXT, and we parse and validate it ourselves. */
const jsonText = <T>(name: string) =>
  customType<{ data: T; driverData: string }>({
    dataType: () => 'longtext',
    toDriver: (value) => JSON.stringify(value),
    fromDriver: (value) => JSON.parse(value) as T,
  })(name);

/**
 * A design (app/lib/design.ts) kept as JSON text, validated by the design schema whenever a row is
 * read: every select of `designs.params` or `sessions.params` gets a valid Design (defaults added
 * since the row was written are filled in), and no model parses it again. Not Drizzle's `json()`:
 * MariaDB's JSON is LONGTEXT, so mysql2 hands back the text and `json()` would not parse it.
 */
const designJson = (name: string) =>
  customType<{ data: Design; driverData: string }>({
    dataType: () => 'longtext',
    toDriver: (value) => JSON.stringify(value),
    fromDriver: (value) => designSchema.parse(JSON.parse(value)),
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
    params: designJson('params').notNull(),
    /** the design this one is a new version of (a design used by a session is read-only:
     * editing it makes a new version; docs/decisions/027-treatment-identity.md) */
    previousId: int('previous_id').references((): AnyMySqlColumn => designs.id, { onDelete: 'set null' }),
    /** 1 for a new design, previous version + 1 (shown as "v2 of …") */
    version: int('version').notNull().default(1),
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

export const SESSION_STATUSES = ['draft', 'open', 'running', 'paused', 'complete', 'archived', 'cancelled'] as const;

/**
 * A session: one live run of a design (product.md). The design is frozen into `params` when the
 * session is made; `seed` drives its draws and matching. The engine (realtime/engine) is the
 * authority on its state; these tables hold what rebuilds it.
 */
export const sessions = mysqlTable(
  'sessions',
  {
    id: int('id').autoincrement().primaryKey(),
    courseId: int('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    designId: int('design_id').references(() => designs.id, { onDelete: 'set null' }),
    /** the design's name when the session was made: the treatment in exports */
    treatment: varchar('treatment', { length: 120 }).notNull(),
    params: designJson('params').notNull(),
    seed: bigint('seed', { mode: 'number', unsigned: true }).notNull(),
    /** short and unambiguous (no 0/O, 1/I); null once archived */
    joinCode: varchar('join_code', { length: 8 }).unique(),
    status: mysqlEnum('status', SESSION_STATUSES).notNull().default('draft'),
    currentSupergame: int('current_supergame').notNull().default(0),
    /**
     * The engine's sequence number of the last stored row of this session (participants, choices,
     * log). The live runner claims the next range with one conditional UPDATE, which also locks the
     * row until its transaction commits: the check that no other writer moved the session on.
     */
    seq: int('seq').notNull().default(0),
    /**
     * Cluster mode's fencing token (docs/decisions/036-fencing-a-session-owner.md): a process that
     * takes a live session over raises it, and every write of the live runner claims it together
     * with `seq`, so a process that lost the session cannot store another row for it.
     */
    leaseEpoch: int('lease_epoch').notNull().default(0),
    /** admit only course members (roster) or anyone signed in, optionally by e-mail domain */
    admission: mysqlEnum('admission', ['roster', 'open']).notNull().default('roster'),
    emailDomain: varchar('email_domain', { length: 120 }),
    /** demo sessions whose choices were simulated, labelled as such everywhere */
    simulated: boolean('simulated').notNull().default(false),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
    startedAt: datetime('started_at', { mode: 'date', fsp: 3 }),
    completedAt: datetime('completed_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [index('sessions_course').on(t.courseId)],
);

/** Participants of a session in join order; `participantKey` is the engine's id (the user id). */
export const sessionParticipants = mysqlTable(
  'session_participants',
  {
    id: int('id').autoincrement().primaryKey(),
    sessionId: int('session_id')
      .notNull()
      .references(() => sessions.id, { onDelete: 'cascade' }),
    userId: int('user_id')
      .notNull()
      .references(() => users.id),
    participantKey: varchar('participant_key', { length: 32 }).notNull(),
    pseudonym: varchar('pseudonym', { length: 16 }).notNull(),
    seq: int('seq').notNull(),
    joinedAtMs: bigint('joined_at_ms', { mode: 'number' }).notNull(),
    /** research consent: null = not asked (the design did not ask), 1 yes, 0 no */
    consent: int('consent'),
    consentAt: datetime('consent_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [
    uniqueIndex('session_participants_user').on(t.sessionId, t.userId),
    uniqueIndex('session_participants_seq').on(t.sessionId, t.seq),
    uniqueIndex('session_participants_pseudonym').on(t.sessionId, t.pseudonym),
  ],
);

/**
 * One row per seat × round: the engine's StoredChoice. The unique key on (session, supergame, round,
 * pair, seat) is what makes a repeated submission write nothing more, whichever process races.
 */
export const choices = mysqlTable(
  'choices',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    sessionId: int('session_id')
      .notNull()
      .references(() => sessions.id, { onDelete: 'cascade' }),
    seq: int('seq').notNull(),
    supergame: int('supergame').notNull(),
    round: int('round').notNull(),
    pairId: varchar('pair_id', { length: 32 }).notNull(),
    seat: int('seat').notNull(),
    participantKey: varchar('participant_key', { length: 32 }),
    action: mysqlEnum('action', ['C', 'D']).notNull(),
    source: mysqlEnum('source', CHOICE_SOURCES).notNull(),
    strategy: varchar('strategy', { length: 24 }),
    clientChoiceId: varchar('client_choice_id', { length: 64 }),
    atMs: bigint('at_ms', { mode: 'number' }).notNull(),
    decisionMs: int('decision_ms').notNull(),
  },
  (t) => [
    uniqueIndex('choices_seq').on(t.sessionId, t.seq),
    uniqueIndex('choices_seat_round').on(t.sessionId, t.supergame, t.round, t.pairId, t.seat),
    index('choices_participant').on(t.sessionId, t.participantKey),
  ],
);

/** Staff actions and re-joins of a session, as the engine logs them. */
export const sessionLog = mysqlTable(
  'session_log',
  {
    id: bigint('id', { mode: 'number' }).autoincrement().primaryKey(),
    sessionId: int('session_id')
      .notNull()
      .references(() => sessions.id, { onDelete: 'cascade' }),
    seq: int('seq').notNull(),
    atMs: bigint('at_ms', { mode: 'number' }).notNull(),
    event: jsonText<unknown>('event').notNull(),
    /** who did it (staff user), when known */
    userId: int('user_id'),
  },
  (t) => [uniqueIndex('session_log_seq').on(t.sessionId, t.seq)],
);

/** The draws of a session's supergames, stored when it opens (derivable from the seed). */
export const supergameDraws = mysqlTable(
  'supergame_draws',
  {
    sessionId: int('session_id')
      .notNull()
      .references(() => sessions.id, { onDelete: 'cascade' }),
    supergame: int('supergame').notNull(),
    draws: jsonText<number[]>('draws').notNull(),
    length: int('length').notNull(),
    roundsPlayed: int('rounds_played').notNull(),
  },
  (t) => [primaryKey({ columns: [t.sessionId, t.supergame] })],
);

/** Pairs of each supergame, for the choice panel's partner column. */
export const sessionPairs = mysqlTable(
  'session_pairs',
  {
    sessionId: int('session_id')
      .notNull()
      .references(() => sessions.id, { onDelete: 'cascade' }),
    supergame: int('supergame').notNull(),
    pairId: varchar('pair_id', { length: 32 }).notNull(),
    seat0: varchar('seat0', { length: 32 }),
    seat1: varchar('seat1', { length: 32 }),
    computerStrategy: varchar('computer_strategy', { length: 24 }),
  },
  (t) => [primaryKey({ columns: [t.sessionId, t.supergame, t.pairId] })],
);

/**
 * Strategy-frequency estimations, stored so a Debrief reloads instantly. `request` names the data
 * (sessions or an uploaded dataset), window, strategy set, bootstrap size and seed; `result` is
 * filled when done; `progress` counts bootstrap replicates done.
 */
export const estimates = mysqlTable(
  'estimates',
  {
    id: int('id').autoincrement().primaryKey(),
    courseId: int('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    request: jsonText<unknown>('request').notNull(),
    /** a stable key of the request, so the same estimation is not run twice */
    requestKey: varchar('request_key', { length: 64 }).notNull(),
    status: mysqlEnum('status', ['queued', 'running', 'done', 'failed']).notNull().default('queued'),
    progress: int('progress').notNull().default(0),
    total: int('total').notNull().default(0),
    result: jsonText<unknown>('result'),
    error: varchar('error', { length: 500 }),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
    finishedAt: datetime('finished_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [index('estimates_course').on(t.courseId, t.requestKey)],
);

/** A choice panel uploaded from elsewhere (another lab, a published data set), for estimation. */
export const datasets = mysqlTable(
  'datasets',
  {
    id: int('id').autoincrement().primaryKey(),
    courseId: int('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    name: varchar('name', { length: 160 }).notNull(),
    rowCount: int('row_count').notNull(),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
  },
  (t) => [index('datasets_course').on(t.courseId)],
);

/**
 * The validated rows of an uploaded panel (app/lib/panel.ts's ChoiceRow), one per choice, `seq`
 * their order in the file. Rows, not one JSON value: a panel under the upload limit can be larger
 * as JSON than MariaDB's max_allowed_packet. Labels are TEXT: the files come from elsewhere and
 * their labels have no length limit of ours.
 */
export const datasetRows = mysqlTable(
  'dataset_rows',
  {
    datasetId: int('dataset_id')
      .notNull()
      .references(() => datasets.id, { onDelete: 'cascade' }),
    seq: int('seq').notNull(),
    session: text('session').notNull(),
    treatment: text('treatment').notNull(),
    subject: text('subject').notNull(),
    partner: text('partner').notNull(),
    supergame: int('supergame').notNull(),
    round: int('round').notNull(),
    action: mysqlEnum('action', ['C', 'D']).notNull(),
    partnerAction: mysqlEnum('partner_action', ['C', 'D']).notNull(),
  },
  (t) => [primaryKey({ columns: [t.datasetId, t.seq] })],
);

/** Bearer tokens for /api/v1: shown once, stored hashed, scoped to courses, revocable. */
export const apiTokens = mysqlTable(
  'api_tokens',
  {
    id: int('id').autoincrement().primaryKey(),
    userId: int('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    name: varchar('name', { length: 120 }).notNull(),
    /** SHA-256 hex of the token */
    tokenHash: varchar('token_hash', { length: 64 }).notNull().unique(),
    /** the first characters, to tell tokens apart in the list */
    prefix: varchar('prefix', { length: 12 }).notNull(),
    courseIds: jsonText<number[]>('course_ids').notNull(),
    createdAt: createdAt(),
    lastUsedAt: datetime('last_used_at', { mode: 'date', fsp: 3 }),
    revokedAt: datetime('revoked_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [index('api_tokens_user').on(t.userId)],
);

/** Who downloaded personal data, and when (identified exports, credit sheets). */
export const exportLog = mysqlTable('export_log', {
  id: int('id').autoincrement().primaryKey(),
  courseId: int('course_id')
    .notNull()
    .references(() => courses.id, { onDelete: 'cascade' }),
  sessionId: int('session_id'),
  userId: int('user_id')
    .notNull()
    .references(() => users.id),
  kind: varchar('kind', { length: 40 }).notNull(),
  createdAt: createdAt(),
});

/** The after-session summary e-mail to each participant: one row per recipient. */
export const resultMails = mysqlTable(
  'result_mails',
  {
    id: int('id').autoincrement().primaryKey(),
    sessionId: int('session_id')
      .notNull()
      .references(() => sessions.id, { onDelete: 'cascade' }),
    userId: int('user_id')
      .notNull()
      .references(() => users.id),
    status: mysqlEnum('status', ['queued', 'sending', 'sent', 'failed']).notNull().default('queued'),
    attempts: int('attempts').notNull().default(0),
    error: varchar('error', { length: 500 }),
    createdAt: createdAt(),
    sentAt: datetime('sent_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [uniqueIndex('result_mails_recipient').on(t.sessionId, t.userId)],
);

/**
 * The comprehension check before play (design option `comprehension`): one row per session and
 * user from the moment the questions are shown, so the Conductor sees who has not passed yet.
 * Kept for the Conductor only; never exported (docs/decisions/028).
 */
export const comprehensionAttempts = mysqlTable(
  'comprehension_attempts',
  {
    id: int('id').autoincrement().primaryKey(),
    sessionId: int('session_id')
      .notNull()
      .references(() => sessions.id, { onDelete: 'cascade' }),
    userId: int('user_id')
      .notNull()
      .references(() => users.id, { onDelete: 'cascade' }),
    /** answers sent so far (0: the questions are on screen, none sent yet) */
    attempts: int('attempts').notNull().default(0),
    /** ids of the questions answered wrongly in the last attempt, comma-separated */
    lastWrong: varchar('last_wrong', { length: 64 }),
    createdAt: createdAt(),
    updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 }),
    passedAt: datetime('passed_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [uniqueIndex('comprehension_attempts_user').on(t.sessionId, t.userId)],
);

/**
 * Background work (app/jobs/queue.server.ts): estimations, results e-mails, pruning. A process takes
 * a ready job by a conditional UPDATE that writes its lease (owner and expiry) and renews the lease
 * while it works; a job whose lease ran out (its process died) is ready again. Fair per course: the
 * next job comes from the course served least recently (docs/decisions/031).
 */
export const jobs = mysqlTable(
  'jobs',
  {
    id: int('id').autoincrement().primaryKey(),
    kind: varchar('kind', { length: 40 }).notNull(),
    /** whose turn it is: jobs are taken fairly between courses (null: the site's own jobs) */
    courseId: int('course_id').references(() => courses.id, { onDelete: 'cascade' }),
    /** validated by the kind's zod schema when queued and again when taken */
    payload: jsonText<unknown>('payload').notNull(),
    state: mysqlEnum('state', ['queued', 'running', 'done', 'failed']).notNull().default('queued'),
    /** set while queued or running: at most one such job per key (null once finished) */
    activeKey: varchar('active_key', { length: 100 }),
    /** asked for again while running: queued once more when this run ends */
    again: boolean('again').notNull().default(false),
    attempts: int('attempts').notNull().default(0),
    leaseOwner: varchar('lease_owner', { length: 80 }),
    leaseUntil: datetime('lease_until', { mode: 'date', fsp: 3 }),
    runAfter: datetime('run_after', { mode: 'date', fsp: 3 })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
    error: varchar('error', { length: 500 }),
    createdAt: createdAt(),
    startedAt: datetime('started_at', { mode: 'date', fsp: 3 }),
    finishedAt: datetime('finished_at', { mode: 'date', fsp: 3 }),
  },
  (t) => [
    uniqueIndex('jobs_active_key').on(t.activeKey),
    index('jobs_ready').on(t.kind, t.state, t.runAfter),
    index('jobs_served').on(t.kind, t.courseId, t.startedAt),
  ],
);

/** A column whose JSON text is checked by a zod schema whenever a row is read (as `designJson`). */
const checkedJson = <T>(name: string, schema: { parse(v: unknown): T }) =>
  customType<{ data: T; driverData: string }>({
    dataType: () => 'longtext',
    toDriver: (value) => JSON.stringify(value),
    fromDriver: (value) => schema.parse(JSON.parse(value)),
  })(name);

/**
 * A strategy league of a course (issue 15; docs/decisions/033): participants enter automata until
 * the deadline, the instructor closes entries, runs the round-robin and evolution (a job), and
 * publishes the results. `design` and `results` are validated when read (app/lib/league-design.ts).
 */
export const leagues = mysqlTable(
  'leagues',
  {
    id: int('id').autoincrement().primaryKey(),
    courseId: int('course_id')
      .notNull()
      .references(() => courses.id, { onDelete: 'cascade' }),
    title: varchar('title', { length: 120 }).notNull(),
    design: checkedJson<LeagueDesign>('design_json', leagueDesignSchema).notNull(),
    /** entries are accepted until then (null: until closed) */
    deadline: datetime('deadline', { mode: 'date', fsp: 3 }),
    state: mysqlEnum('state', LEAGUE_STATES).notNull().default('open'),
    /** the last run's numbers (null until run) */
    results: checkedJson<LeagueResults>('results_json', leagueResultsSchema),
    /** the run job, as the league page polls it (the estimate's shape: status, progress of total) */
    runStatus: mysqlEnum('run_status', LEAGUE_RUN_STATUSES).notNull().default('none'),
    runProgress: int('run_progress').notNull().default(0),
    runTotal: int('run_total').notNull().default(0),
    runError: varchar('run_error', { length: 500 }),
    createdBy: int('created_by')
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
    closedAt: datetime('closed_at', { mode: 'date', fsp: 3 }),
    runAt: datetime('run_at', { mode: 'date', fsp: 3 }),
    publishedAt: datetime('published_at', { mode: 'date', fsp: 3 }),
    /** the session whose strategy estimate the results page compares with */
    comparisonSessionId: int('comparison_session_id').references(() => sessions.id, { onDelete: 'set null' }),
  },
  (t) => [index('leagues_course').on(t.courseId)],
);

/**
 * One entry of a league: a participant's (one per user and league) or a house entry the instructor
 * added (user null, house true). The strategy is a parley-strategy v1 file (docs/formats/strategy.md).
 */
export const leagueEntries = mysqlTable(
  'league_entries',
  {
    id: int('id').autoincrement().primaryKey(),
    leagueId: int('league_id')
      .notNull()
      .references(() => leagues.id, { onDelete: 'cascade' }),
    userId: int('user_id').references(() => users.id, { onDelete: 'cascade' }),
    house: boolean('house').notNull().default(false),
    /** shown in the results: the participant's display name by default, or a team name */
    name: varchar('name', { length: 60 }).notNull(),
    strategy: checkedJson<StrategyFile>('automaton_json', leagueStrategySchema).notNull(),
    createdAt: createdAt(),
    updatedAt: datetime('updated_at', { mode: 'date', fsp: 3 })
      .notNull()
      .default(sql`CURRENT_TIMESTAMP(3)`),
  },
  (t) => [uniqueIndex('league_entries_user').on(t.leagueId, t.userId)],
);

export const usersRelations = relations(users, ({ many }) => ({ memberships: many(courseMembers) }));
export const coursesRelations = relations(courses, ({ many }) => ({ members: many(courseMembers) }));
export const courseMembersRelations = relations(courseMembers, ({ one }) => ({
  course: one(courses, { fields: [courseMembers.courseId], references: [courses.id] }),
  user: one(users, { fields: [courseMembers.userId], references: [users.id] }),
}));
