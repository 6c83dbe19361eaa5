import { z } from 'zod';

const csv = z
  .string()
  .default('')
  .transform((s) =>
    s
      .split(',')
      .map((e) => e.trim().toLowerCase())
      .filter(Boolean),
  );

const schema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  PORT: z.coerce.number().int().min(1).max(65535).default(3000),
  HOST: z.string().default('127.0.0.1'),
  /** where links in e-mails point: the address participants' phones reach */
  APP_URL: z.url(),
  DATABASE_URL: z.string().startsWith('mysql://', 'DATABASE_URL must be a mysql:// URL'),
  SESSION_SECRET: z.string().min(32, 'SESSION_SECRET needs at least 32 characters'),
  TOTP_SECRET: z.string().regex(/^[0-9a-fA-F]{64}$/, 'TOTP_SECRET must be exactly 64 hexadecimal characters'),
  SMTP_URL: z.string().startsWith('smtp', 'SMTP_URL must be an smtp:// or smtps:// URL'),
  MAIL_FROM: z.string().min(3).default('Parley <no-reply@parley.test>'),
  ADMIN_EMAILS: csv,
  /** e-mail domains whose addresses may create courses themselves, matched exactly
   * (docs/decisions/023-who-creates-courses.md); empty: only admins and granted accounts */
  INSTRUCTOR_DOMAINS: csv,
  /** invitation and roster e-mails one course may send per 24 hours */
  INVITES_PER_COURSE_PER_DAY: z.coerce.number().int().min(1).default(500),
  /** how long a mail may wait for the mail server to connect, greet or answer, in milliseconds */
  SMTP_TIMEOUT_MS: z.coerce.number().int().min(500).max(60_000).default(5000),
  /** test seam (set by scripts/test.mjs only): a file of addresses whose mail fails as if the
   * mail server were down; unset in production */
  PARLEY_TEST_MAIL_FAULTS: z.string().optional(),
  /** sign-in codes one e-mail address may be sent per 15 minutes from one network */
  CODE_REQUESTS_PER_EMAIL_AND_IP: z.coerce.number().int().min(1).default(5),
  /** sign-in codes one e-mail address may be sent per 15 minutes from anywhere: bounds guessing
   * (each code takes CODE_WRONG_TRIES tries) and the mail one person can be sent */
  CODE_REQUESTS_PER_EMAIL: z.coerce.number().int().min(1).default(10),
  /** sign-in codes one network address may request per 15 minutes (a lecture hall behind one NAT
   * address signs in 600 students in 10 minutes) */
  CODE_REQUESTS_PER_IP: z.coerce.number().int().min(1).default(1000),
  /** join codes matching no open session that one network address may type per 15 minutes on
   * the public /join page (right codes do not count) */
  JOIN_CODE_MISSES_PER_IP: z.coerce.number().int().min(1).default(300),
  /** wrong codes a code takes before it stops working; its owner asks for a new one */
  CODE_WRONG_TRIES: z.coerce.number().int().min(1).max(20).default(5),
  /** results e-mails after a session are sent in the background, at most this many per minute */
  RESULT_MAILS_PER_MINUTE: z.coerce.number().int().min(1).max(6000).default(300),
  /** strategy-frequency estimations one person may have queued or running at a time */
  ESTIMATES_PER_USER: z.coerce.number().int().min(1).max(100).default(3),
  /** off: this process takes no background jobs (estimations, results e-mails, pruning) and
   * leaves them to the other processes on the same database (a test's second server that runs
   * with another environment, e.g. a dead mail server) */
  PARLEY_JOBS: z.enum(['on', 'off']).default('on'),
  /** cluster mode: several processes share socket.io's Redis adapter and own live sessions one
   * each (docs/decisions/032-one-owner-per-session.md); unset: one process, no Redis */
  REDIS_URL: z
    .string()
    .regex(/^rediss?:\/\//, 'REDIS_URL must be a redis:// or rediss:// URL')
    .optional()
    .transform((v) => v || undefined),
  /** behind a reverse proxy, read the client address from X-Forwarded-For */
  TRUST_PROXY: z
    .enum(['0', '1', 'true', 'false'])
    .default('0')
    .transform((v) => v === '1' || v === 'true'),
});

export type Env = z.infer<typeof schema>;

let cached: Env | undefined;

/** The validated environment; fails loudly at start-up with every problem listed. */
export function env(): Env {
  if (cached) return cached;
  const parsed = schema.safeParse(process.env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`).join('\n');
    throw new Error(`Parley's environment is incomplete (see .env.example):\n${lines}`);
  }
  cached = parsed.data;
  return cached;
}
