// The worker's heartbeat: its threads and watchdog state, written to Redis every few seconds.
import { hostname } from 'node:os';
import { Redis } from 'ioredis';
import { redisConnection } from '../server/queue';
import { allBeats, heartbeatKey, HEARTBEAT_EVERY_MS, type BeatClient, type WorkerBeat } from '../server/services/heartbeat';
import type { RunPool } from './pool';

const FORGET_AFTER_MS = 24 * 3600_000;

const workerId = (): string => `${hostname()}:${process.pid}`;

async function writeBeat(client: BeatClient, beat: WorkerBeat): Promise<void> {
  await client.hset(heartbeatKey(), { [beat.id]: JSON.stringify(beat) });
}

/** Forgets a worker: at its orderly stop, and for beats a day old (a worker killed outright). */
async function dropBeats(client: BeatClient, ids: string[]): Promise<void> {
  if (ids.length) await client.hdel(heartbeatKey(), ...ids);
}

export function startHeartbeat(pool: RunPool, threads: number): { stop(): Promise<void> } {
  // Its own client, failing fast: a beat missed while Redis is away is what a heartbeat is for.
  const redis = new Redis({ ...(redisConnection as object), maxRetriesPerRequest: 1, enableOfflineQueue: false });
  redis.on('error', () => undefined);
  const client: BeatClient = redis;
  const id = workerId();
  const beat = () => writeBeat(client, { id, threads, quietRuns: pool.watch.quiet, terminatedThreads: pool.watch.terminated, at: Date.now() }).catch(() => undefined);
  const timer = setInterval(beat, HEARTBEAT_EVERY_MS);
  pool.onWatchChange = () => void beat();
  redis.once('ready', () => {
    void beat();
    void allBeats(client)
      .then((beats) => dropBeats(client, beats.filter((b) => Date.now() - b.at > FORGET_AFTER_MS).map((b) => b.id)))
      .catch(() => undefined);
  });
  return {
    stop: async () => {
      clearInterval(timer);
      pool.onWatchChange = () => undefined;
      await dropBeats(client, [id]).catch(() => undefined);
      redis.disconnect();
    },
  };
}
