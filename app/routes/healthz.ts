import { databaseAnswers } from '#app/utils/db.server';

// 200 only when MariaDB answers: used by `npm start`, tests and load balancers.
export async function loader() {
  const ok = await databaseAnswers();
  return Response.json({ ok, database: ok ? 'up' : 'down' }, { status: ok ? 200 : 503, headers: { 'Cache-Control': 'no-store' } });
}
