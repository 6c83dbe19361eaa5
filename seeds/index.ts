// `npm run db:seed`: the invented demo scenario, idempotently.
import { drizzle } from 'drizzle-orm/mysql2';
import mysql from 'mysql2/promise';
import * as schema from '#drizzle/schema';
import { seedDemo } from './demo';

const url = process.env.DATABASE_URL;
if (!url) throw new Error('DATABASE_URL is not set');
const connection = await mysql.createConnection({ uri: url });
try {
  const { courseId } = await seedDemo(drizzle(connection, { schema, mode: 'default' }));
  console.log(`[parley] demo scenario in place (invented data; course ${courseId})`);
} finally {
  await connection.end();
}
