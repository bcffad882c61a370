import { randomBytes } from 'node:crypto';
import { availableParallelism, hostname } from 'node:os';
import type { Redis } from 'ioredis';

/**
 * Worker processes on one machine share its cores. Each process registers in Redis under its host's name and counts
 * the others there every few seconds; its reading queues (ingest and analysis) then each run as many jobs at once as
 * its share of the cores: one worker alone on two cores runs two of each, two workers on those two cores one each.
 * bench:throughput (issue 13) measured a second worker with the full two per queue beside the first on two cores at
 * 0.89× the shots per second of the first alone: twice the threads, each job's CPU spread over more of them.
 */

/**
 * The jobs of each reading queue the worker at `rank` (0-based, in the host's list) runs at once: the host's cores
 * split as evenly as they go, the first `cores mod workers` workers one more, never fewer than one (BullMQ's least).
 */
export function concurrencyShare(cores: number, workers: number, rank: number): number {
  const n = Math.max(1, Math.floor(workers));
  const c = Math.max(1, Math.floor(cores));
  const r = Math.min(Math.max(0, Math.floor(rank)), n - 1);
  return Math.max(1, Math.floor(c / n) + (r < c % n ? 1 : 0));
}

export interface HostShareOptions {
  /** Redis connection (a plain ioredis client; not a BullMQ blocking one). */
  redis: Redis;
  /** Name of the machine the processes share (GATEPOST_WORKER_HOST); default the host name. */
  host?: string;
  /** Cores the worker processes of this host share (GATEPOST_WORKER_CORES); default os.availableParallelism(). */
  cores?: number;
  /** How often the process says it is alive and counts the others, ms. @default 2000 */
  heartbeatMs?: number;
  /** Called with the new share whenever it changes (and once at the start). */
  onShare(share: number, seen: { workers: number; rank: number; cores: number }): void;
  /** A heartbeat that could not reach Redis (the share stays as it was; BullMQ waits for Redis anyway). */
  onError?(err: Error): void;
}

export interface HostShare {
  /** The member name of this process in the host's list. */
  readonly id: string;
  /** The current share (jobs per reading queue). */
  readonly share: number;
  /** Leaves the host's list (the others take its cores at their next heartbeat) and stops the heartbeat. */
  stop(): Promise<void>;
}

const KEY_PREFIX = 'gatepost:worker-host:';

/**
 * Registers this process as a worker of its host and keeps its share up to date. A process that dies without
 * stop() drops out of the list three heartbeats later (its entry carries an expiry time), so the others take its
 * cores back. Resolves after the first count, so the Workers start with the right concurrency.
 */
export async function joinHost(options: HostShareOptions): Promise<HostShare> {
  const { redis, onShare, onError } = options;
  const host = options.host ?? hostname();
  const cores = options.cores ?? availableParallelism();
  const heartbeatMs = options.heartbeatMs ?? 2_000;
  const key = `${KEY_PREFIX}${host}`;
  // Ordered by the time of joining (the first member's id sorts first), so ranks stay put as others come and go.
  const id = `${Date.now().toString().padStart(15, '0')}:${process.pid}:${randomBytes(4).toString('hex')}`;
  const ttlMs = heartbeatMs * 3;
  let share = 0;
  let timer: NodeJS.Timeout | undefined;
  let stopped = false;

  const beat = async () => {
    const now = Date.now();
    // Members are kept in a sorted set scored by when they expire; a lexical range over the members gives the
    // order of joining. One round trip.
    const replies = await redis.multi()
      .zremrangebyscore(key, '-inf', now)
      .zadd(key, now + ttlMs, id)
      .pexpire(key, ttlMs)
      .zrange(key, 0, -1)
      .exec();
    if (stopped) return;
    const failed = replies?.find(([err]) => err);
    if (!replies || failed) throw failed?.[0] ?? new Error('the heartbeat transaction was discarded');
    const members = (replies[3][1] as string[]).slice().sort();
    const rank = Math.max(0, members.indexOf(id));
    const next = concurrencyShare(cores, members.length, rank);
    if (next !== share) {
      share = next;
      onShare(share, { workers: members.length, rank, cores });
    }
  };

  try {
    await beat();
  } catch (err) {
    // Redis away at the start: run with the whole host's share until a heartbeat gets through.
    onError?.(err as Error);
    share = concurrencyShare(cores, 1, 0);
    onShare(share, { workers: 1, rank: 0, cores });
  }
  const schedule = () => {
    timer = setTimeout(() => {
      beat().catch((err: Error) => onError?.(err)).finally(() => {
        if (!stopped) schedule();
      });
    }, heartbeatMs);
    timer.unref();
  };
  schedule();

  return {
    id,
    get share() {
      return share;
    },
    async stop() {
      stopped = true;
      clearTimeout(timer);
      await redis.zrem(key, id).catch(() => {});
    },
  };
}
