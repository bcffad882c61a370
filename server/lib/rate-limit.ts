import type { Redis } from 'ioredis';
import type { Response } from 'express';
import type { Config } from '../config.ts';
import { tooManyRequests } from './errors.ts';

export interface LoginLimiterOptions {
  /** Failed attempts allowed on one account from one address in a window, before that address is refused for it. @default 5 */
  maxFailures?: number;
  /** Window length in seconds, counted from the first failure. @default 900 */
  windowSeconds?: number;
  /** The first delay once failures pile up; each further failure doubles it. @default 250 */
  delayStepMs?: number;
  /** The longest delay: a right password is answered at most this late, never refused. @default 8000 */
  maxDelayMs?: number;
  /**
   * How long an attempt waits for a place while the account's other attempts from the same address are still being
   * checked (their outcome unknown), before it is refused. @default 20000
   */
  maxWaitMs?: number;
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

/**
 * Holds the request for the attempt's delay, then refuses it (429 with Retry-After) when the attempt is blocked.
 * `message` is given the wait in whole minutes.
 */
export async function holdOrRefuse(res: Response, attempt: LoginAttempt, message: (minutes: number) => string): Promise<void> {
  if (attempt.delayMs > 0) await new Promise((resolve) => setTimeout(resolve, attempt.delayMs));
  if (!attempt.blocked) return;
  res.set('Retry-After', String(attempt.retryAfterSeconds));
  throw tooManyRequests(message(Math.ceil(attempt.retryAfterSeconds / 60)), attempt.retryAfterSeconds);
}

/** Failures before the delays start: a person mistyping twice notices nothing. */
const FREE_FAILURES = 2;
/** One address trying many accounts (a shared lab PC, a NAT) earns its delays this many times more slowly. */
const ADDRESS_FAILURES_PER_STEP = 4;
/** How often a waiting attempt looks again for a place. */
const WAIT_STEP_MS = 40;
/** An attempt still counted as being checked after this long (or the window, if shorter) is taken as ended. */
const IN_FLIGHT_SECONDS = 60;

/**
 * Slows down password guessing without letting anyone lock anyone else out (issue 12, item 3). Counters live in
 * Redis (plain MULTI/INCR/EXPIRE, shared by every API process):
 * - per account and source address: past `maxFailures`, that address is refused for that account until the window
 *   ends. Someone guessing from elsewhere cannot lock the owner out, nor the owner's colleagues on the same network;
 * - per account from every address and per address over every account: progressive delays (doubling from
 *   `delayStepMs` up to `maxDelayMs`), which slow a spread-out attack while a right password still gets in;
 * - a lab admin can clear an account's counters (`unlock`); the route mails the owner when the account's failures
 *   reach `maxFailures` in a window.
 *
 * An attempt is counted before its password is checked (`reserve`) and then ends with `release` (right password:
 * the count is given back) or `fail` (wrong: it stays). Attempts still being checked are tracked apart, so that
 * many people signing in at once with one shared account and the right password are never refused: an attempt that
 * finds every place of its address taken only by attempts still being checked waits for them (up to `maxWaitMs`),
 * and is refused only when `maxFailures` of them really failed. At most `maxFailures` passwords from one address
 * are ever checked at once for one account, so parallel guessing gains nothing.
 */
export class LoginLimiter {
  readonly maxFailures: number;
  private readonly windowSeconds: number;
  private readonly delayStepMs: number;
  private readonly maxDelayMs: number;
  private readonly maxWaitMs: number;
  private readonly prefix: string;

  constructor(private readonly redis: Redis, options: LoginLimiterOptions = {}) {
    const { maxFailures = 5, windowSeconds = 900, delayStepMs = 250, maxDelayMs = 8000, maxWaitMs = 20_000, prefix = 'gp:login-fail' } = options;
    if (!(maxFailures >= 1)) throw new RangeError('maxFailures must be at least 1');
    if (!(windowSeconds >= 1)) throw new RangeError('windowSeconds must be at least 1');
    if (!(delayStepMs >= 0) || !(maxDelayMs >= 0)) throw new RangeError('delayStepMs and maxDelayMs must be 0 or more');
    this.maxFailures = maxFailures;
    this.windowSeconds = windowSeconds;
    this.delayStepMs = delayStepMs;
    this.maxDelayMs = maxDelayMs;
    this.maxWaitMs = maxWaitMs;
    this.prefix = prefix;
  }

  private keys(email: string, address: string) {
    return {
      pair: `${this.prefix}:pair:${email}\n${address}`,
      pairs: `${this.prefix}:pairs:${email}`,
      account: `${this.prefix}:acct:${email}`,
      address: `${this.prefix}:addr:${address}`,
      // Attempts of this account from this address whose password is being checked now.
      checking: `${this.prefix}:checking:${email}\n${address}`,
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
    const tries = Math.max(1, Math.ceil(this.maxWaitMs / WAIT_STEP_MS));
    for (let i = 1; ; i++) {
      const attempt = await this.tryReserve(email, address, i >= tries);
      if (attempt !== 'wait') return attempt;
      await new Promise((resolve) => setTimeout(resolve, WAIT_STEP_MS));
    }
  }

  /** One try: an attempt, or 'wait' when only attempts still being checked fill this address's places. */
  private async tryReserve(email: string, address: string, lastTry: boolean): Promise<LoginAttempt | 'wait'> {
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
      .incr(k.checking).expire(k.checking, Math.min(IN_FLIGHT_SECONDS, w))
      .exec();
    const value = (i: number) => Number(replies?.[i]?.[1] ?? 0);
    const [pair, account, addressCount, pairTtl, checking] = [value(1), value(3), value(5), value(6), value(9)];
    if (pair > this.maxFailures) {
      // Counted attempts minus those still being checked (this one among them) are the failures known so far.
      const failed = pair - checking;
      if (failed < this.maxFailures && !lastTry) {
        // Not refused on others' account: give this try back and look again once some of them have ended.
        await this.redis.multi().decr(k.pair).decr(k.account).decr(k.address).decr(k.checking).exec();
        return 'wait';
      }
      await this.redis.decr(k.checking);
      const delayMs = Math.max(this.delayAfter(account - 1), this.delayAfter(Math.floor((addressCount - 1) / ADDRESS_FAILURES_PER_STEP)));
      return { blocked: true, retryAfterSeconds: Math.max(1, pairTtl), delayMs, accountAttempts: account };
    }
    const delayMs = Math.max(this.delayAfter(account - 1), this.delayAfter(Math.floor((addressCount - 1) / ADDRESS_FAILURES_PER_STEP)));
    return { blocked: false, retryAfterSeconds: 0, delayMs, accountAttempts: account };
  }

  /** After a wrong password: the attempt stays counted as a failure and is no longer being checked. */
  async fail(email: string, address: string): Promise<void> {
    const k = this.keys(email, address);
    await this.ended(k.checking);
  }

  /** After a successful sign-in: this address starts again on this account; the other counters give back this attempt. */
  async release(email: string, address: string): Promise<void> {
    const k = this.keys(email, address);
    await this.redis.multi().del(k.pair).srem(k.pairs, k.pair).decr(k.account).decr(k.address).exec();
    await this.ended(k.checking);
  }

  /** One attempt of the pair is no longer being checked (never below zero: the counter may have expired meanwhile). */
  private async ended(checking: string): Promise<void> {
    const left = await this.redis.decr(checking);
    if (left < 0) await this.redis.incr(checking);
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
