import { drizzle, type MySql2Database } from 'drizzle-orm/mysql2';
import mysql from 'mysql2/promise';
import * as schema from '#drizzle/schema';
import { env } from './env.server';

export type Db = MySql2Database<typeof schema>;

// One pool per process, kept across Vite's reloads of this module in development.
declare global {
  // one per process: kept across Vite's reloads of this module, shared by server.ts and the built bundle
  var __parleyPool: mysql.Pool | undefined;
  var __parleyDb: Db | undefined;
}
const g = globalThis;

export function pool(): mysql.Pool {
  g.__parleyPool ??= mysql.createPool({
    uri: env().DATABASE_URL,
    connectionLimit: 20,
    timezone: 'Z',
    dateStrings: false,
    supportBigNumbers: true,
  });
  return g.__parleyPool;
}

export function db(): Db {
  g.__parleyDb ??= drizzle(pool(), { schema, mode: 'default' });
  return g.__parleyDb;
}

export async function closeDb() {
  const p = g.__parleyPool;
  g.__parleyPool = undefined;
  g.__parleyDb = undefined;
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
