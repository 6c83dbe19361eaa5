// Integration and end-to-end tests run against the server, MariaDB and maildev that
// `npm test` starts (scripts/test.mjs); run them through it, not through vitest alone.
if (!process.env.PARLEY_TEST_URL || !process.env.PARLEY_MAIL_API || !process.env.DATABASE_URL) {
  throw new Error('Run integration and end-to-end tests with `npm test` (it starts MariaDB, maildev and the app).');
}
