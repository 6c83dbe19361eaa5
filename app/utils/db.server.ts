import { drizzle, type MySql2Database } from 'drizzle-orm/mysql2';
import mysql from 'mysql2/promise';
import * as schema from '#drizzle/schema';
import { env } from './env.server';
import { forget, remember, remembered } from './remember.server';

export type Db = MySql2Database<typeof schema>;

// One pool per process (remember.server.ts says why it lives on globalThis).
export function pool(): mysql.Pool {
  return remember('db-pool', () =>
    mysql.createPool({
      uri: env().DATABASE_URL,
      connectionLimit: 20,
      timezone: 'Z',
      dateStrings: false,
      supportBigNumbers: true,
    }),
  );
}

export function db(): Db {
  return remember('db', () => drizzle(pool(), { schema, mode: 'default' }));
}

export async function closeDb() {
  const p = remembered<mysql.Pool>('db-pool');
  forget('db-pool');
  forget('db');
  await p?.end();
}

/** True when MariaDB answers a query within two seconds. */
export async function databaseAnswers(): Promise<boolean> {
  let timer: NodeJS.Timeout | undefined;
  try {
    const conn = await Promise.race([
      pool().query('SELECT 1'),
      new Promise<never>((_, reject) => {
        timer = setTimeout(() => reject(new Error('timeout')), 2000);
      }),
    ]);
    return Boolean(conn);
  } catch {
    return false;
  } finally {
    clearTimeout(timer);
  }
}
