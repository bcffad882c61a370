// Worker processes of one machine split its cores (worker/host-share.ts): the share arithmetic, and the register in
// Redis (here a stand-in holding the one sorted set the register uses, with the same commands) as processes come,
// go, or die without saying so.
import type { Redis } from 'ioredis';
import { describe, expect, it } from 'vitest';
import { concurrencyShare, joinHost, type HostShare } from '../../../worker/host-share.ts';

describe('concurrencyShare', () => {
  it('gives one worker alone every core of its host', () => {
    expect(concurrencyShare(2, 1, 0)).toBe(2);
    expect(concurrencyShare(8, 1, 0)).toBe(8);
  });

  it('splits the cores evenly, the first workers taking the remainder, and the shares add up to the cores', () => {
    expect([0, 1].map((r) => concurrencyShare(2, 2, r))).toEqual([1, 1]);
    expect([0, 1].map((r) => concurrencyShare(3, 2, r))).toEqual([2, 1]);
    expect([0, 1, 2].map((r) => concurrencyShare(8, 3, r))).toEqual([3, 3, 2]);
    for (const [cores, workers] of [[2, 2], [4, 3], [16, 5], [7, 7]]) {
      const shares = Array.from({ length: workers }, (_, r) => concurrencyShare(cores, workers, r));
      expect(shares.reduce((a, b) => a + b, 0), `${cores} cores, ${workers} workers`).toBe(cores);
    }
  });

  it('never gives less than one job (BullMQ refuses a concurrency below 1), even with more workers than cores', () => {
    expect([0, 1, 2].map((r) => concurrencyShare(2, 3, r))).toEqual([1, 1, 1]);
    expect(concurrencyShare(1, 4, 3)).toBe(1);
    expect(concurrencyShare(0, 0, 0)).toBe(1);
  });
});

/** The few Redis commands the register uses, on an in-memory sorted set per key (scores compared as numbers). */
function fakeRedis() {
  const sets = new Map<string, Map<string, number>>();
  const set = (key: string) => sets.get(key) ?? sets.set(key, new Map()).get(key)!;
  let down = false;
  const redis = {
    multi() {
      const ops: (() => unknown)[] = [];
      const chain = {
        zremrangebyscore(key: string, _min: string, max: number) {
          ops.push(() => {
            let removed = 0;
            for (const [m, s] of set(key)) if (s <= max) removed += Number(set(key).delete(m));
            return removed;
          });
          return chain;
        },
        zadd(key: string, score: number, member: string) {
          ops.push(() => (set(key).set(member, score), 1));
          return chain;
        },
        pexpire() {
          ops.push(() => 1);
          return chain;
        },
        zrange(key: string) {
          ops.push(() => [...set(key)].sort((a, b) => a[1] - b[1] || a[0].localeCompare(b[0])).map(([m]) => m));
          return chain;
        },
        async exec() {
          if (down) throw new Error('Connection is closed.');
          return ops.map((op) => [null, op()]);
        },
      };
      return chain;
    },
    async zrem(key: string, member: string) {
      return Number(set(key).delete(member));
    },
  };
  return { redis: redis as unknown as Redis, sets, setDown: (d: boolean) => { down = d; } };
}

async function until(check: () => boolean, what: string): Promise<void> {
  for (let i = 0; i < 500; i++) {
    if (check()) return;
    await new Promise((resolve) => setTimeout(resolve, 10));
  }
  throw new Error(`gave up waiting for ${what}`);
}

describe('joinHost', () => {
  it('gives the first worker of a host all its cores, then splits them when a second joins and gives them back when it leaves', async () => {
    const { redis } = fakeRedis();
    const seenA: number[] = [];
    const seenB: number[] = [];
    const a = await joinHost({ redis, host: 'bench-1', cores: 2, heartbeatMs: 20, onShare: (s) => seenA.push(s) });
    expect(a.share).toBe(2);
    expect(seenA).toEqual([2]);
    const b = await joinHost({ redis, host: 'bench-1', cores: 2, heartbeatMs: 20, onShare: (s) => seenB.push(s) });
    // The newcomer counts both at once; the first one learns at its next heartbeat.
    expect(b.share).toBe(1);
    await until(() => a.share === 1, 'the first worker to give up a core');
    expect(seenA).toEqual([2, 1]);
    await b.stop();
    await until(() => a.share === 2, 'the first worker to take the core back');
    expect(seenA).toEqual([2, 1, 2]);
    expect(seenB).toEqual([1]);
    await a.stop();
  });

  it('gives the remainder to the worker that joined first, whatever their ids', async () => {
    const { redis } = fakeRedis();
    const first = await joinHost({ redis, host: 'h', cores: 3, heartbeatMs: 20, onShare: () => {} });
    await new Promise((resolve) => setTimeout(resolve, 2));
    const second = await joinHost({ redis, host: 'h', cores: 3, heartbeatMs: 20, onShare: () => {} });
    await until(() => first.share === 2, 'the first worker to settle on two of three cores');
    expect(second.share).toBe(1);
    await Promise.all([first.stop(), second.stop()]);
  });

  it('counts workers per host: another machine on the same Redis changes nothing', async () => {
    const { redis } = fakeRedis();
    const a = await joinHost({ redis, host: 'left', cores: 2, heartbeatMs: 20, onShare: () => {} });
    const b = await joinHost({ redis, host: 'right', cores: 2, heartbeatMs: 20, onShare: () => {} });
    await new Promise((resolve) => setTimeout(resolve, 80));
    expect([a.share, b.share]).toEqual([2, 2]);
    await Promise.all([a.stop(), b.stop()]);
  });

  it('takes back the cores of a worker that died without leaving once its entry expires', async () => {
    const { redis, sets } = fakeRedis();
    const a = await joinHost({ redis, host: 'h', cores: 2, heartbeatMs: 20, onShare: () => {} });
    // A worker that registered, then was killed (SIGKILL): its entry stays with its last expiry time.
    sets.get('gatepost:worker-host:h')!.set('000000000000001:99999:dead', Date.now() + 60);
    await until(() => a.share === 1, 'the first worker to count the other');
    await until(() => a.share === 2, 'the dead worker\'s entry to expire');
    await a.stop();
  });

  it('runs with the whole host\'s share when Redis cannot be reached at the start, and keeps its share while Redis is away', async () => {
    const { redis, setDown } = fakeRedis();
    setDown(true);
    const errors: string[] = [];
    const a = await joinHost({ redis, host: 'h', cores: 4, heartbeatMs: 20, onShare: () => {}, onError: (e) => errors.push(e.message) });
    expect(a.share).toBe(4);
    expect(errors[0]).toMatch(/closed/);
    await until(() => errors.length >= 3, 'more heartbeats to fail');
    expect(a.share).toBe(4);
    setDown(false);
    const b: HostShare = await joinHost({ redis, host: 'h', cores: 4, heartbeatMs: 20, onShare: () => {} });
    // The second may join before the first's next heartbeat has put it back in the list: it then starts with the
    // whole host and halves its share at its own next heartbeat. Both must settle on two.
    await until(() => a.share === 2 && b.share === 2, 'both workers to count each other once Redis is back');
    await Promise.all([a.stop(), b.stop()]);
  });
});
