// LoginLimiter on ioredis-mock: the plain Redis commands it uses (MULTI, SET NX EX, INCR, DECR, TTL, SADD, SMEMBERS,
// DEL) behave as on a real Redis, and ioredis-mock expires keys by Date.now(), so fake time moves the window.
import RedisMock from 'ioredis-mock';
import type { Redis } from 'ioredis';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { LoginLimiter, type LoginAttempt } from '../../../server/lib/rate-limit.ts';

const ACCOUNT = 'ines.calder@hollowmere.example';
// RFC 5737 documentation addresses.
const ATTACKER = '192.0.2.66';
const OWNER = '198.51.100.7';
const COLLEAGUE = '198.51.100.8';

/** An attempt whose password turns out wrong: counted before the check, then `fail`. */
async function failed(limiter: LoginLimiter, account: string, address: string): Promise<LoginAttempt> {
  const attempt = await limiter.reserve(account, address);
  if (!attempt.blocked) await limiter.fail(account, address);
  return attempt;
}

describe('LoginLimiter', () => {
  let redis: Redis;
  beforeEach(async () => {
    vi.useFakeTimers({ toFake: ['Date'] });
    vi.setSystemTime(new Date('2026-12-01T09:00:00Z'));
    redis = new RedisMock() as unknown as Redis;
    // ioredis-mock instances share one store per host and port: start each test empty.
    await redis.flushall();
  });
  afterEach(() => {
    vi.useRealTimers();
  });

  it('When one address fails maxFailures times on an account, then that address is refused for it, and the owner elsewhere is not', async () => {
    // Arrange
    const limiter = new LoginLimiter(redis, { maxFailures: 3, windowSeconds: 60 });
    // Act
    const attacker = [];
    for (let i = 0; i < 4; i++) attacker.push(await failed(limiter, ACCOUNT, ATTACKER));
    const owner = await limiter.reserve(ACCOUNT, OWNER);
    // Assert
    expect(attacker.map((a) => a.blocked)).toEqual([false, false, false, true]);
    expect(attacker[3].retryAfterSeconds).toBe(60);
    expect(owner.blocked).toBe(false);
  });

  it('When one address fails on many accounts (a shared network), then nobody there is refused, only slowed', async () => {
    // Arrange
    const limiter = new LoginLimiter(redis, { maxFailures: 3, windowSeconds: 60, delayStepMs: 250, maxDelayMs: 8000 });
    // Act: forty accounts, one failure each, from one address.
    const attempts = [];
    for (let i = 0; i < 40; i++) attempts.push(await failed(limiter, `user${i}@example.org`, COLLEAGUE));
    // Assert
    expect(attempts.every((a) => !a.blocked)).toBe(true);
    // Address failures count a quarter as much: 39 earlier ones are worth 9, i.e. the delay after 9 failures.
    expect(attempts[39].delayMs).toBe(limiter.delayAfter(9));
    expect(attempts[0].delayMs).toBe(0);
  });

  it('When failures pile up on an account from many addresses, then the delay doubles from the step up to the cap', async () => {
    // Arrange
    const limiter = new LoginLimiter(redis, { maxFailures: 5, windowSeconds: 60, delayStepMs: 250, maxDelayMs: 8000 });
    // Act: one attempt from each of twelve addresses.
    const delays = [];
    for (let i = 0; i < 12; i++) delays.push((await failed(limiter, ACCOUNT, `203.0.113.${i}`)).delayMs);
    // Assert: two free failures, then 250 ms doubling, capped at 8 s.
    expect(delays).toEqual([0, 0, 0, 250, 500, 1000, 2000, 4000, 8000, 8000, 8000, 8000]);
  });

  it('When time passes, then the window counts from the first failure and later failures do not extend it', async () => {
    // Arrange
    const limiter = new LoginLimiter(redis, { maxFailures: 2, windowSeconds: 60 });
    await failed(limiter, ACCOUNT, ATTACKER);
    vi.advanceTimersByTime(20_000);
    await failed(limiter, ACCOUNT, ATTACKER);
    // Act
    const blocked = await limiter.reserve(ACCOUNT, ATTACKER);
    vi.advanceTimersByTime(40_000);
    const after = await limiter.reserve(ACCOUNT, ATTACKER);
    // Assert: 60 s from the first failure, of which 20 s had passed.
    expect(blocked).toMatchObject({ blocked: true, retryAfterSeconds: 40 });
    expect(after).toMatchObject({ blocked: false, accountAttempts: 1 });
  });

  it('When a reserved attempt succeeds, then release gives the attempt back and that address starts again on the account', async () => {
    // Arrange
    const limiter = new LoginLimiter(redis, { maxFailures: 3, windowSeconds: 60 });
    await failed(limiter, ACCOUNT, OWNER);
    await failed(limiter, ACCOUNT, ATTACKER);
    await limiter.reserve(ACCOUNT, OWNER);
    // Act
    await limiter.release(ACCOUNT, OWNER);
    const next = await limiter.reserve(ACCOUNT, OWNER);
    // Assert: the owner's address counts from one again; the account keeps the attacker's failure and the owner's first.
    expect(next).toMatchObject({ blocked: false, accountAttempts: 3 });
  });

  it('When a lab admin unlocks an account, then every address may try again at once', async () => {
    // Arrange
    const limiter = new LoginLimiter(redis, { maxFailures: 2, windowSeconds: 60 });
    for (const address of [ATTACKER, OWNER]) for (let i = 0; i < 3; i++) await failed(limiter, ACCOUNT, address);
    expect((await limiter.reserve(ACCOUNT, OWNER)).blocked).toBe(true);
    // Act
    await limiter.unlock(ACCOUNT);
    // Assert
    expect(await limiter.reserve(ACCOUNT, OWNER)).toMatchObject({ blocked: false, delayMs: 0, accountAttempts: 1 });
    expect((await limiter.reserve(ACCOUNT, ATTACKER)).blocked).toBe(false);
  });

  it('When ten people sign in at once with one shared account from one address and the right password, then none is refused', async () => {
    // Arrange: a class at the start of a session, one lab account, the lab's one outward address.
    const limiter = new LoginLimiter(redis, { maxFailures: 3, windowSeconds: 60 });
    let checking = 0;
    let most = 0;
    // Act: each attempt is checked (a few milliseconds, as argon2 takes its time) and succeeds.
    const attempts = await Promise.all(Array.from({ length: 10 }, async () => {
      const attempt = await limiter.reserve(ACCOUNT, COLLEAGUE);
      if (attempt.blocked) return attempt;
      most = Math.max(most, ++checking);
      await new Promise((resolve) => setTimeout(resolve, 15));
      checking--;
      await limiter.release(ACCOUNT, COLLEAGUE);
      return attempt;
    }));
    // Assert: all in; never more than maxFailures checked at once from that address.
    expect(attempts.map((a) => a.blocked)).toEqual(Array(10).fill(false));
    expect(most).toBeLessThanOrEqual(3);
  });

  it('When many wrong passwords arrive at once from one address, then at most maxFailures are checked and the rest are refused once those failed', async () => {
    // Arrange
    const limiter = new LoginLimiter(redis, { maxFailures: 3, windowSeconds: 60 });
    // Act
    const attempts = await Promise.all(Array.from({ length: 8 }, async () => {
      const attempt = await limiter.reserve(ACCOUNT, ATTACKER);
      if (attempt.blocked) return attempt;
      await new Promise((resolve) => setTimeout(resolve, 15));
      await limiter.fail(ACCOUNT, ATTACKER);
      return attempt;
    }));
    // Assert
    expect(attempts.filter((a) => !a.blocked)).toHaveLength(3);
    expect(attempts.filter((a) => a.blocked)).toHaveLength(5);
  });

  it('When attempts are counted, then every key the limiter writes carries an expiry of at most the window', async () => {
    // Arrange
    const limiter = new LoginLimiter(redis, { maxFailures: 3, windowSeconds: 45 });
    // Act
    for (let i = 1; i < 5; i++) await failed(limiter, `user${i % 2}@example.org`, `192.0.2.${i}`);
    await limiter.reserve('user0@example.org', '192.0.2.0');
    await limiter.release('user0@example.org', '192.0.2.0');
    // Assert
    const keys = await redis.keys('*');
    expect(keys.length).toBeGreaterThan(5);
    for (const key of keys) {
      const ttl = await redis.ttl(key);
      expect(ttl, key).toBeGreaterThan(0);
      expect(ttl, key).toBeLessThanOrEqual(45);
    }
  });

  it('When built with a limit or window below 1 or a negative delay, then it throws a RangeError naming the option', () => {
    expect(() => new LoginLimiter(redis, { maxFailures: 0 })).toThrow(new RangeError('maxFailures must be at least 1'));
    expect(() => new LoginLimiter(redis, { windowSeconds: 0 })).toThrow(new RangeError('windowSeconds must be at least 1'));
    expect(() => new LoginLimiter(redis, { maxFailures: Number.NaN })).toThrow(RangeError);
    expect(() => new LoginLimiter(redis, { maxDelayMs: -1 })).toThrow(new RangeError('delayStepMs and maxDelayMs must be 0 or more'));
  });
});
