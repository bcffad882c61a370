import type { Redis } from 'ioredis';
import type { Config } from '../config.ts';

export interface LoginLimiterOptions {
  /** Failed attempts allowed on one account from one address in a window, before that address is refused for it. @default 5 */
  maxFailures?: number;
  /** Window length in seconds, counted from the first failure. @default 900 */
  windowSeconds?: number;
  /** The first delay once failures pile up; each further failure doubles it. @default 250 */
  delayStepMs?: number;
  /** The longest delay: a right password is answered at most this late, never refused. @default 8000 */
  maxDelayMs?: number;
  /** Redis key prefix, so other guarded actions (password reset requests) count apart from sign-ins. @default 'gp:login-fail' */
  prefix?: string;
}

export interface LoginAttempt {
  /** This account is refused from this address until the window ends (another address is not affected). */
  blocked: boolean;
  retryAfterSeconds: number;
  /** How long to hold the answer: grows with the account's and the address's failures in the window. */
  delayMs: number;
  /** Attempts on the account in the window from every address, this one included. */
  accountAttempts: number;
}

/** Failures before the delays start: a person mistyping twice notices nothing. */
const FREE_FAILURES = 2;
/** One address trying many accounts (a shared lab PC, a NAT) earns its delays this many times more slowly. */
const ADDRESS_FAILURES_PER_STEP = 4;

/**
 * Slows down password guessing without letting anyone lock anyone else out (issue 12, item 3). Counters live in
 * Redis (plain MULTI/INCR/EXPIRE, shared by every API process):
 * - per account and source address: past `maxFailures`, that address is refused for that account until the window
 *   ends. Someone guessing from elsewhere cannot lock the owner out, nor the owner's colleagues on the same network;
 * - per account from every address and per address over every account: progressive delays (doubling from
 *   `delayStepMs` up to `maxDelayMs`), which slow a spread-out attack while a right password still gets in;
 * - a lab admin can clear an account's counters (`unlock`); the route mails the owner when the account's failures
 *   reach `maxFailures` in a window.
 */
export class LoginLimiter {
  readonly maxFailures: number;
  private readonly windowSeconds: number;
  private readonly delayStepMs: number;
  private readonly maxDelayMs: number;
  private readonly prefix: string;

  constructor(private readonly redis: Redis, options: LoginLimiterOptions = {}) {
    const { maxFailures = 5, windowSeconds = 900, delayStepMs = 250, maxDelayMs = 8000, prefix = 'gp:login-fail' } = options;
    if (!(maxFailures >= 1)) throw new RangeError('maxFailures must be at least 1');
    if (!(windowSeconds >= 1)) throw new RangeError('windowSeconds must be at least 1');
    if (!(delayStepMs >= 0) || !(maxDelayMs >= 0)) throw new RangeError('delayStepMs and maxDelayMs must be 0 or more');
    this.maxFailures = maxFailures;
    this.windowSeconds = windowSeconds;
    this.delayStepMs = delayStepMs;
    this.maxDelayMs = maxDelayMs;
    this.prefix = prefix;
  }

  private keys(email: string, address: string) {
    return {
      pair: `${this.prefix}:pair:${email}\n${address}`,
      pairs: `${this.prefix}:pairs:${email}`,
      account: `${this.prefix}:acct:${email}`,
      address: `${this.prefix}:addr:${address}`,
    };
  }

  /** The delay after `failures` earlier failures: none for the first two, then step, 2 step, 4 step … up to the cap. */
  delayAfter(failures: number): number {
    if (failures <= FREE_FAILURES) return 0;
    return Math.min(this.maxDelayMs, this.delayStepMs * 2 ** (failures - FREE_FAILURES - 1));
  }

  /**
   * Counts this attempt before the (slow) password check and says whether it may go ahead and how long to hold
   * it. Counting first is what stops parallel guesses: with check-then-record, ten simultaneous wrong passwords
   * all pass the check before any failure is recorded. A successful sign-in gives its count back with `release`.
   */
  async reserve(email: string, address: string): Promise<LoginAttempt> {
    const k = this.keys(email, address);
    const w = this.windowSeconds;
    // SET … NX starts each window at its first failure only (later failures must not extend it), in the same
    // MULTI as the INCR, so a counter can never be left without an expiry.
    const replies = await this.redis
      .multi()
      .set(k.pair, '0', 'EX', w, 'NX').incr(k.pair)
      .set(k.account, '0', 'EX', w, 'NX').incr(k.account)
      .set(k.address, '0', 'EX', w, 'NX').incr(k.address)
      .ttl(k.pair)
      .sadd(k.pairs, k.pair).expire(k.pairs, w)
      .exec();
    const value = (i: number) => Number(replies?.[i]?.[1] ?? 0);
    const [pair, account, addressCount, pairTtl] = [value(1), value(3), value(5), value(6)];
    const delayMs = Math.max(this.delayAfter(account - 1), this.delayAfter(Math.floor((addressCount - 1) / ADDRESS_FAILURES_PER_STEP)));
    if (pair > this.maxFailures) return { blocked: true, retryAfterSeconds: Math.max(1, pairTtl), delayMs, accountAttempts: account };
    return { blocked: false, retryAfterSeconds: 0, delayMs, accountAttempts: account };
  }

  /** After a successful sign-in: this address starts again on this account; the other counters give back this attempt. */
  async release(email: string, address: string): Promise<void> {
    const k = this.keys(email, address);
    await this.redis.multi().del(k.pair).srem(k.pairs, k.pair).decr(k.account).decr(k.address).exec();
  }

  /** A lab admin's unlock: every count on the account, from every address, is cleared. */
  async unlock(email: string): Promise<void> {
    const { pairs, account } = this.keys(email, '');
    const pairKeys = await this.redis.smembers(pairs);
    await this.redis.del(account, pairs, ...pairKeys);
  }
}

/** The sign-in limiter of the API server, from its settings. */
export function createLoginLimiter(redis: Redis, config: Config): LoginLimiter {
  return new LoginLimiter(redis, {
    maxFailures: config.loginMaxFailures,
    windowSeconds: config.loginWindowSeconds,
    delayStepMs: config.loginDelayStepMs,
    maxDelayMs: config.loginMaxDelayMs,
  });
}

/**
 * A plain cap on an action that guards no secret (sign out everywhere, a password change that went through,
 * disabling or enabling members): at most `max` per `windowSeconds` per key, counted in Redis like the sign-in
 * limiter (SET NX EX + INCR in one MULTI, so the window starts at the first action and always expires).
 */
export class ActionLimiter {
  constructor(
    private readonly redis: Redis,
    private readonly name: string,
    private readonly max: number,
    private readonly windowSeconds: number,
  ) {
    if (!(max >= 1) || !(windowSeconds >= 1)) throw new RangeError('max and windowSeconds must be at least 1');
  }

  /** Counts one action of `key`; says whether it is over the cap, and for how long. */
  async take(key: string): Promise<{ allowed: boolean; retryAfterSeconds: number }> {
    const k = `gp:action:${this.name}:${key}`;
    const replies = await this.redis.multi().set(k, '0', 'EX', this.windowSeconds, 'NX').incr(k).ttl(k).exec();
    const count = Number(replies?.[1]?.[1] ?? 0);
    const ttl = Number(replies?.[2]?.[1] ?? this.windowSeconds);
    return { allowed: count <= this.max, retryAfterSeconds: Math.max(1, ttl) };
  }
}
