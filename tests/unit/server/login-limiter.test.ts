// LoginLimiter on ioredis-mock: the plain Redis commands it uses (MULTI, SET NX EX, INCR, MGET, TTL, DEL) behave
// as on a real Redis, and ioredis-mock expires keys by Date.now(), so fake time moves the window.
import RedisMock from 'ioredis-mock';
import type { Redis } from 'ioredis';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { LoginLimiter } from '../../../server/lib/rate-limit.ts';

const ACCOUNT = 'ines.calder@hollowmere.example';
const ADDRESS = '192.0.2.10'; // RFC 5737 documentation address
const accountKey = (email: string) => `gp:login-fail:acct:${email}`;
const addressKey = (address: string) => `gp:login-fail:addr:${address}`;

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

  it('When fewer than maxFailures sign-ins have failed, then the account is not blocked; at maxFailures it is', async () => {
    // Arrange
    const limiter = new LoginLimiter(redis, { maxFailures: 3, windowSeconds: 60 });
    // Act + Assert
    for (let i = 0; i < 3; i++) {
      expect(await limiter.check(ACCOUNT, ADDRESS)).toEqual({ blocked: false, retryAfterSeconds: 0 });
      await limiter.recordFailure(ACCOUNT, ADDRESS);
    }
    expect(await limiter.check(ACCOUNT, ADDRESS)).toEqual({ blocked: true, retryAfterSeconds: 60 });
    // The block is per account: another account from another address is untouched.
    expect((await limiter.check('tomas.reyl@hollowmere.example', '192.0.2.11')).blocked).toBe(false);
  });

  it('When time passes, then the window counts from the first failure and later failures do not extend it', async () => {
    // Arrange
    const limiter = new LoginLimiter(redis, { maxFailures: 3, windowSeconds: 60 });
    await limiter.recordFailure(ACCOUNT, ADDRESS);
    vi.advanceTimersByTime(20_000);
    await limiter.recordFailure(ACCOUNT, ADDRESS);
    await limiter.recordFailure(ACCOUNT, ADDRESS);
    // Act
    const blocked = await limiter.check(ACCOUNT, ADDRESS);
    vi.advanceTimersByTime(40_000 - 1);
    const justBefore = await limiter.check(ACCOUNT, ADDRESS);
    vi.advanceTimersByTime(1);
    const after = await limiter.check(ACCOUNT, ADDRESS);
    // Assert: 60 s from the first failure, of which 20 s have passed.
    expect(blocked).toEqual({ blocked: true, retryAfterSeconds: 40 });
    expect(justBefore.blocked).toBe(true);
    expect(after).toEqual({ blocked: false, retryAfterSeconds: 0 });
    expect(await redis.exists(accountKey(ACCOUNT))).toBe(0);
  });

  it('When one address fails on many accounts, then it is blocked at the address limit (4 x maxFailures by default)', async () => {
    // Arrange
    const limiter = new LoginLimiter(redis, { maxFailures: 2, windowSeconds: 60 });
    // Act: eight accounts, one failure each, so no account reaches its own limit.
    for (let i = 0; i < 8; i++) {
      expect((await limiter.check(`user${i}@example.org`, ADDRESS)).blocked).toBe(false);
      await limiter.recordFailure(`user${i}@example.org`, ADDRESS);
    }
    // Assert
    expect(await limiter.check('fresh@example.org', ADDRESS)).toEqual({ blocked: true, retryAfterSeconds: 60 });
    expect((await limiter.check('fresh@example.org', '192.0.2.99')).blocked).toBe(false);
  });

  it('When maxFailuresPerAddress is given, then it replaces the default address limit', async () => {
    // Arrange
    const limiter = new LoginLimiter(redis, { maxFailures: 5, maxFailuresPerAddress: 2, windowSeconds: 60 });
    // Act
    await limiter.recordFailure('a@example.org', ADDRESS);
    const afterOne = await limiter.check('b@example.org', ADDRESS);
    await limiter.recordFailure('b@example.org', ADDRESS);
    const afterTwo = await limiter.check('c@example.org', ADDRESS);
    // Assert
    expect(afterOne.blocked).toBe(false);
    expect(afterTwo.blocked).toBe(true);
  });

  it('When a sign-in succeeds, then the account counter is cleared but the address counter stays', async () => {
    // Arrange
    const limiter = new LoginLimiter(redis, { maxFailures: 3, windowSeconds: 60 });
    await limiter.recordFailure(ACCOUNT, ADDRESS);
    await limiter.recordFailure(ACCOUNT, ADDRESS);
    // Act
    await limiter.recordSuccess(ACCOUNT);
    // Assert
    expect(await redis.exists(accountKey(ACCOUNT))).toBe(0);
    expect(await redis.get(addressKey(ADDRESS))).toBe('2');
    // Two more failures no longer block the account: its count restarted at zero.
    await limiter.recordFailure(ACCOUNT, ADDRESS);
    await limiter.recordFailure(ACCOUNT, ADDRESS);
    expect((await limiter.check(ACCOUNT, ADDRESS)).blocked).toBe(false);
  });

  it('When failures are recorded, then every key the limiter writes carries an expiry of at most the window', async () => {
    // Arrange
    const limiter = new LoginLimiter(redis, { maxFailures: 3, windowSeconds: 45 });
    // Act
    for (let i = 0; i < 5; i++) await limiter.recordFailure(`user${i % 2}@example.org`, `192.0.2.${i}`);
    await limiter.recordSuccess('user0@example.org');
    // Assert
    const keys = await redis.keys('*');
    expect(keys.length).toBe(6); // user1's account key + five address keys
    for (const key of keys) {
      const ttl = await redis.ttl(key);
      expect(ttl, key).toBeGreaterThan(0);
      expect(ttl, key).toBeLessThanOrEqual(45);
    }
  });

  it('When built with a limit or window below 1, then it throws a RangeError naming the option', () => {
    expect(() => new LoginLimiter(redis, { maxFailures: 0 })).toThrow(new RangeError('maxFailures must be at least 1'));
    expect(() => new LoginLimiter(redis, { windowSeconds: 0 })).toThrow(new RangeError('windowSeconds must be at least 1'));
    expect(() => new LoginLimiter(redis, { maxFailures: Number.NaN })).toThrow(RangeError);
  });

  it('When attempts are reserved before the password check, then the one past maxFailures is refused with the remaining window', async () => {
    // Arrange
    const limiter = new LoginLimiter(redis, { maxFailures: 3, windowSeconds: 60 });
    // Act: three attempts go ahead, the fourth (even if its password would be right) is refused
    const states = [];
    for (let i = 0; i < 4; i++) states.push(await limiter.reserve(ACCOUNT, ADDRESS));
    // Assert
    expect(states.map((s) => s.blocked)).toEqual([false, false, false, true]);
    expect(states[3].retryAfterSeconds).toBe(60);
    expect(await redis.get(accountKey(ACCOUNT))).toBe('4');
    expect(await redis.ttl(accountKey(ACCOUNT))).toBe(60);
  });

  it('When a reserved attempt succeeds, then release clears the account and gives the address its attempt back', async () => {
    // Arrange
    const limiter = new LoginLimiter(redis, { maxFailures: 3, windowSeconds: 60 });
    await limiter.reserve(ACCOUNT, ADDRESS);
    await limiter.reserve(ACCOUNT, ADDRESS);
    // Act
    await limiter.release(ACCOUNT, ADDRESS);
    // Assert
    expect(await redis.exists(accountKey(ACCOUNT))).toBe(0);
    expect(await redis.get(addressKey(ADDRESS))).toBe('1');
  });
});
