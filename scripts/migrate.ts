// Applies the committed SQL migrations in drizzle/migrations on a single connection.
import { drizzle } from 'drizzle-orm/mysql2';
import { migrate } from 'drizzle-orm/mysql2/migrator';
import mysql from 'mysql2/promise';

const url = process.env.DATABASE_URL;
if (!url) throw new Error('DATABASE_URL is not set');
const connection = await mysql.createConnection({ uri: url, multipleStatements: true });
try {
  await migrate(drizzle(connection), { migrationsFolder: 'drizzle/migrations' });
  console.log('[parley] database migrated');
} finally {
  await connection.end();
}
