// The jobs this app runs, and the one worker per process that runs them (server.ts starts it).
import { and, inArray, lt } from 'drizzle-orm';
import { z } from 'zod';
import { estimateJob } from '#app/models/estimate.server';
import { leagueRunJob } from '#app/models/league.server';
import { resultMailsJob } from '#app/models/result-mails.server';
import { pruneAuthEvents, pruneAuthSessions } from '#app/utils/auth.server';
import { db } from '#app/utils/db.server';
import { pruneSignInCodes } from '#app/utils/sign-in.server';
import { jobs } from '#drizzle/schema';
import { defineJob, enqueue, startJobWorker, type JobWorker } from './queue.server';

/** Finished jobs are kept this long (what ran, and when), then forgotten. */
const KEEP_FINISHED_MS = 7 * 24 * 3600_000;

/** Expired sign-ins, old sign-in codes and events, and old finished jobs: forgotten every hour. */
export const pruneJob = defineJob({
  kind: 'prune',
  payload: z.object({}),
  concurrency: 1,
  everyMs: 3600_000,
  run: async () => {
    await pruneAuthSessions();
    await pruneAuthEvents();
    await pruneSignInCodes();
    await db()
      .delete(jobs)
      .where(and(inArray(jobs.state, ['done', 'failed']), lt(jobs.finishedAt, new Date(Date.now() - KEEP_FINISHED_MS))));
  },
  // queued once for the whole site (its key keeps it one); after each run it is queued again
  recover: async () => {
    await enqueue(pruneJob, {}, { key: PRUNE_KEY });
    return 0;
  },
});

export const PRUNE_KEY = 'prune';

export const JOB_KINDS = [estimateJob, resultMailsJob, leagueRunJob, pruneJob];

/** This process's worker: resumes what older processes left, then takes jobs as they come. */
export function startJobs(): JobWorker {
  return startJobWorker(JOB_KINDS);
}
