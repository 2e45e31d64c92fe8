import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { randomUUID } from 'node:crypto';
import { Queue } from 'bullmq';
import type { Redis } from 'ioredis';
import { QUEUES, type ScoringJob } from '@shared/jobs/queues';
import { loadConfig, type Config } from '../../server/src/config/index';
import { createRedis } from '../../server/src/lib/redis';
import { ScoringQueue, MAX_JOB_IDS } from '../../server/src/ingest/ingest-queue';

/**
 * The producer side of the scoring queue on the real Redis (BullMQ's scripts do not run on a mock):
 * the ids of small stored batches are gathered for a few milliseconds into one job, a job never holds
 * more than MAX_JOB_IDS ids, each id is queued once, and close() sends what is still gathered.
 */

let config: Config;
let connection: Redis;
let reader: Queue<ScoringJob>;

const ids = (from: number, n: number) => Array.from({ length: n }, (_, i) => from + i);

async function jobs(): Promise<ScoringJob[]> {
  const all = await reader.getJobs(['waiting', 'active', 'completed', 'delayed', 'failed', 'prioritized']);
  return all.map((j) => j.data).sort((a, b) => a.transactionIds[0] - b.transactionIds[0]);
}

beforeAll(() => {
  config = loadConfig({ ...process.env, EDGECASE_MODE: 'test', REDIS_PREFIX: `t-${randomUUID().slice(0, 8)}`, LOG_LEVEL: 'silent' });
  connection = createRedis(config, { forBullmq: true, name: 'test-queue-reader' });
  reader = new Queue<ScoringJob>(QUEUES.scoring, { connection, prefix: config.REDIS_PREFIX });
});

afterAll(async () => {
  await reader.obliterate({ force: true });
  await reader.close();
  connection.disconnect();
});

describe('scoring queue producer', () => {
  it('gathers the batches stored within its window into one job named by the first, and splits at the job size', async () => {
    await reader.obliterate({ force: true });
    const q = new ScoringQueue(config, { gatherMs: 150 });
    try {
      q.enqueueSoon({ transactionIds: ids(1, 3), batch: 'b-1' });
      q.enqueueSoon({ transactionIds: ids(4, 2), batch: 'b-2' });
      q.enqueueSoon({ transactionIds: ids(6, 5), batch: 'b-3' });
      // Nothing is queued before the window ends.
      expect(await jobs()).toEqual([]);
      await new Promise((r) => setTimeout(r, 400));
      expect(await jobs()).toEqual([{ transactionIds: ids(1, 10), batch: 'b-1' }]);

      // A batch that would take the job past its size sends the gathered ids first and starts the next job.
      q.enqueueSoon({ transactionIds: ids(100, MAX_JOB_IDS - 10), batch: 'b-4' });
      q.enqueueSoon({ transactionIds: ids(2000, 20), batch: 'b-5' });
      await new Promise((r) => setTimeout(r, 400));
      const after = await jobs();
      expect(after.map((j) => [j.batch, j.transactionIds.length])).toEqual([
        ['b-1', 10],
        ['b-4', MAX_JOB_IDS - 10],
        ['b-5', 20],
      ]);
    } finally {
      await q.close();
    }
  });

  it('sends what it has gathered when it closes, without waiting for the window', async () => {
    await reader.obliterate({ force: true });
    const q = new ScoringQueue(config, { gatherMs: 60_000 });
    q.enqueueSoon({ transactionIds: ids(7000, 4), batch: 'b-close' });
    await q.close();
    expect(await jobs()).toEqual([{ transactionIds: ids(7000, 4), batch: 'b-close' }]);
  });
});
