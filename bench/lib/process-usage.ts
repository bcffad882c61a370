/**
 * What a benchmark phase cost the processes and services it ran against (bench/throughput.ts): processor time
 * (user + sys, all threads) of each process from /proc, its largest thread count, the largest number of PostgreSQL
 * connections and Redis clients seen, and the PostgreSQL transactions and Redis commands the phase made (each
 * statement outside a transaction is one transaction: a round-trip count). Linux only; elsewhere the /proc figures
 * read as null.
 */
import { readFileSync } from 'node:fs';
import { Redis } from 'ioredis';
import { QueryTypes } from 'sequelize';
import { createSequelize } from '../../server/db/sequelize.ts';

/** Clock ticks per second of /proc/<pid>/stat (USER_HZ, 100 on Linux for every common architecture; `getconf CLK_TCK`). */
const TICKS_PER_SECOND = 100;

/** Processor seconds (user + sys, every thread) the process has used, or null when /proc cannot say. */
export function cpuSeconds(pid: number): number | null {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, 'utf8');
    // Fields after the command name (which may hold spaces, in parentheses): state is field 3, utime 14, stime 15.
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    return (Number(fields[11]) + Number(fields[12])) / TICKS_PER_SECOND;
  } catch {
    return null;
  }
}

/** The process's current thread count (Node's own threads, libuv's pool and any worker threads), or null. */
export function threadCount(pid: number): number | null {
  try {
    const match = /^Threads:\s+(\d+)/m.exec(readFileSync(`/proc/${pid}/status`, 'utf8'));
    return match ? Number(match[1]) : null;
  } catch {
    return null;
  }
}

export interface PhaseUsage {
  /** Processor seconds of each named process over the phase. */
  cpu: Record<string, number | null>;
  /** Largest thread count of each named process seen during the phase. */
  maxThreads: Record<string, number | null>;
  /** Largest number of connections to the database seen (this sampler's own not counted). */
  maxPgConnections: number;
  /** Largest number of Redis clients seen (this sampler's own not counted). */
  maxRedisClients: number;
  /** PostgreSQL transactions committed or rolled back in the phase. */
  pgTransactions: number;
  /** Redis commands processed in the phase (this sampler's own included: a few per sample). */
  redisCommands: number;
}

/** Samples every `everyMs` until stop(); the processes are looked up by pid at each sample (they may come and go). */
export async function sampleUsage(processes: () => Record<string, number>, everyMs = 250): Promise<{ stop(): Promise<PhaseUsage> }> {
  const databaseUrl = process.env.GATEPOST_TEST_DATABASE_URL!;
  const redisUrl = process.env.GATEPOST_TEST_REDIS_URL!;
  const sequelize = createSequelize(databaseUrl);
  const redis = new Redis(redisUrl, { maxRetriesPerRequest: 1 });
  const pgCounters = async () => {
    const [row] = await sequelize.query<{ xacts: string; connections: string }>(
      `select (select xact_commit + xact_rollback from pg_stat_database where datname = current_database()) as xacts,
              (select count(*) from pg_stat_activity where datname = current_database() and pid <> pg_backend_pid()) as connections`,
      { type: QueryTypes.SELECT },
    );
    return { xacts: Number(row.xacts), connections: Number(row.connections) };
  };
  const redisCounters = async () => {
    const info = await redis.info('stats');
    const commands = Number(/total_commands_processed:(\d+)/.exec(info)?.[1] ?? 0);
    const clients = (await redis.client('LIST') as string).trim().split('\n').length - 1;
    return { commands, clients };
  };
  const startCpu = Object.fromEntries(Object.entries(processes()).map(([name, pid]) => [name, cpuSeconds(pid)]));
  // pg_stat_database is updated by each backend when its transaction ends and read from a snapshot: clear it first.
  await sequelize.query('select pg_stat_clear_snapshot()');
  const pgStart = await pgCounters();
  const redisStart = await redisCounters();
  const maxThreads: Record<string, number | null> = {};
  let maxPgConnections = pgStart.connections;
  let maxRedisClients = redisStart.clients;
  const lastCpu: Record<string, number | null> = { ...startCpu };
  let busy = false;
  const tick = async () => {
    if (busy) return;
    busy = true;
    try {
      for (const [name, pid] of Object.entries(processes())) {
        const t = threadCount(pid);
        if (t !== null) maxThreads[name] = Math.max(maxThreads[name] ?? 0, t);
        const c = cpuSeconds(pid);
        if (c !== null) lastCpu[name] = c;
        if (!(name in startCpu)) startCpu[name] = 0;
      }
      await sequelize.query('select pg_stat_clear_snapshot()');
      maxPgConnections = Math.max(maxPgConnections, (await pgCounters()).connections);
      maxRedisClients = Math.max(maxRedisClients, (await redisCounters()).clients);
    } catch {
      // A sample lost to a busy moment changes no total.
    } finally {
      busy = false;
    }
  };
  const timer = setInterval(() => void tick(), everyMs);
  return {
    async stop() {
      clearInterval(timer);
      await tick();
      await sequelize.query('select pg_stat_clear_snapshot()');
      const pgEnd = await pgCounters();
      const redisEnd = await redisCounters();
      await Promise.allSettled([sequelize.close(), redis.quit()]);
      const cpu = Object.fromEntries(Object.entries(lastCpu).map(([name, c]) => [name, c === null || startCpu[name] === null ? null : c - startCpu[name]!]));
      return {
        cpu, maxThreads, maxPgConnections, maxRedisClients,
        pgTransactions: pgEnd.xacts - pgStart.xacts, redisCommands: redisEnd.commands - redisStart.commands,
      };
    },
  };
}
