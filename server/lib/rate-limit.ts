import type { Redis } from 'ioredis';

export interface LoginLimiterOptions {
  /** Failed attempts allowed per account in one window. @default 5 */
  maxFailures?: number;
  /** Failed attempts allowed per client address in one window (many accounts from one place). @default 4 × maxFailures */
  maxFailuresPerAddress?: number;
  /** Window length in seconds, counted from the first failure. @default 900 */
  windowSeconds?: number;
}

export interface LimitState {
  blocked: boolean;
  retryAfterSeconds: number;
}

/**
 * Counts failed sign-ins in Redis (plain INCR/EXPIRE, so every API process shares the counters). A success clears
 * the account's counter; the address counter only expires, so one known account cannot reset a guessing run.
 */
export class LoginLimiter {
  private readonly maxFailures: number;
  private readonly maxFailuresPerAddress: number;
  private readonly windowSeconds: number;

  constructor(private readonly redis: Redis, options: LoginLimiterOptions = {}) {
    const { maxFailures = 5, windowSeconds = 900 } = options;
    if (!(maxFailures >= 1)) throw new RangeError('maxFailures must be at least 1');
    if (!(windowSeconds >= 1)) throw new RangeError('windowSeconds must be at least 1');
    this.maxFailures = maxFailures;
    this.maxFailuresPerAddress = options.maxFailuresPerAddress ?? 4 * maxFailures;
    this.windowSeconds = windowSeconds;
  }

  private keys(email: string, address: string) {
    return { account: `gp:login-fail:acct:${email}`, address: `gp:login-fail:addr:${address}` };
  }

  async check(email: string, address: string): Promise<LimitState> {
    const k = this.keys(email, address);
    const [account, addr] = await this.redis.mget(k.account, k.address);
    const accountBlocked = Number(account ?? 0) >= this.maxFailures;
    const addressBlocked = Number(addr ?? 0) >= this.maxFailuresPerAddress;
    if (!accountBlocked && !addressBlocked) return { blocked: false, retryAfterSeconds: 0 };
    const ttls = await Promise.all([
      accountBlocked ? this.redis.ttl(k.account) : Promise.resolve(0),
      addressBlocked ? this.redis.ttl(k.address) : Promise.resolve(0),
    ]);
    return { blocked: true, retryAfterSeconds: Math.max(1, ...ttls) };
  }

  async recordFailure(email: string, address: string): Promise<void> {
    const k = this.keys(email, address);
    // SET … NX starts the window at the first failure only (later failures must not extend it), and doing it in
    // the same MULTI as the INCR means a counter can never be left without an expiry.
    await this.redis
      .multi()
      .set(k.account, '0', 'EX', this.windowSeconds, 'NX')
      .incr(k.account)
      .set(k.address, '0', 'EX', this.windowSeconds, 'NX')
      .incr(k.address)
      .exec();
  }

  /**
   * Counts this attempt before the (slow) password check and says whether it may go ahead. Counting first is what
   * stops parallel guesses: with check-then-record, ten simultaneous wrong passwords all pass the check before any
   * failure is recorded. A successful sign-in gives its count back with `release`.
   */
  async reserve(email: string, address: string): Promise<LimitState> {
    const k = this.keys(email, address);
    const replies = await this.redis
      .multi()
      .set(k.account, '0', 'EX', this.windowSeconds, 'NX')
      .incr(k.account)
      .set(k.address, '0', 'EX', this.windowSeconds, 'NX')
      .incr(k.address)
      .ttl(k.account)
      .ttl(k.address)
      .exec();
    const value = (i: number) => Number(replies?.[i]?.[1] ?? 0);
    const accountBlocked = value(1) > this.maxFailures;
    const addressBlocked = value(3) > this.maxFailuresPerAddress;
    if (!accountBlocked && !addressBlocked) return { blocked: false, retryAfterSeconds: 0 };
    return { blocked: true, retryAfterSeconds: Math.max(1, accountBlocked ? value(4) : 0, addressBlocked ? value(5) : 0) };
  }

  /** After a successful sign-in: the account's count starts again; the address gives back this one attempt. */
  async release(email: string, address: string): Promise<void> {
    const k = this.keys(email, address);
    await this.redis.multi().del(k.account).decr(k.address).exec();
  }

  async recordSuccess(email: string): Promise<void> {
    await this.redis.del(`gp:login-fail:acct:${email}`);
  }
}
