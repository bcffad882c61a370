import type { Response } from 'express';
import type { Redis } from 'ioredis';
import { ACCOUNT_CHANGED_CHANNEL } from '../../lib/account-events.ts';
import { LAB_EVENT_PATTERN, labIdOfChannel } from '../../lib/lab-events.ts';
import type { Logger } from '../../lib/logger.ts';

interface Client {
  res: Response;
  userId: string;
  /** Re-checks the stream's credential and membership; false ends the stream. */
  stillAllowed: () => Promise<boolean>;
}

/**
 * The API process's end of the lab event streams: one Redis subscription (a pattern over every lab's channel) for
 * however many browsers are connected, each notice written only to the streams opened on its own lab.
 * The subscription is made on the first stream and kept; Redis reconnects it by itself after an outage.
 */
export class LabEventHub {
  private subscriber: Redis | null = null;
  private readonly clients = new Map<string, Set<Client>>();

  constructor(private readonly redis: Redis, private readonly logger: Logger) {}

  /** Streams a user has open in this process (to cap them). */
  openBy(userId: string): number {
    let n = 0;
    for (const set of this.clients.values()) for (const c of set) if (c.userId === userId) n += 1;
    return n;
  }

  add(labId: string, client: Client): () => void {
    this.ensureSubscribed();
    const set = this.clients.get(labId) ?? new Set<Client>();
    set.add(client);
    this.clients.set(labId, set);
    return () => {
      set.delete(client);
      if (set.size === 0) this.clients.delete(labId);
    };
  }

  /** Ends every stream (server shutdown: browsers reconnect to the next process) and the subscription. */
  async close(): Promise<void> {
    for (const set of this.clients.values()) for (const c of set) c.res.end();
    this.clients.clear();
    const sub = this.subscriber;
    this.subscriber = null;
    if (sub) await sub.quit().catch(() => sub.disconnect());
  }

  private ensureSubscribed() {
    if (this.subscriber) return;
    const sub = this.redis.duplicate({ maxRetriesPerRequest: null, enableOfflineQueue: true });
    this.subscriber = sub;
    sub.on('error', (err: Error) => this.logger.warn({ err: err.message }, 'lab event subscription: redis problem'));
    sub.on('pmessage', (_pattern: string, channel: string, message: string) => this.deliver(channel, message));
    sub.on('message', (channel: string, message: string) => {
      if (channel === ACCOUNT_CHANGED_CHANNEL) this.recheckAccount(message);
    });
    sub.psubscribe(LAB_EVENT_PATTERN).catch((err: Error) => this.logger.warn({ err: err.message }, 'lab event subscription failed; clients poll'));
    sub.subscribe(ACCOUNT_CHANGED_CHANNEL).catch((err: Error) => this.logger.warn({ err: err.message }, 'account change subscription failed; streams re-check at each beat'));
  }

  /** An account's credentials changed: each of its streams re-checks and ends if no longer allowed. */
  private recheckAccount(message: string) {
    let userId: unknown;
    try {
      userId = (JSON.parse(message) as { userId?: unknown }).userId;
    } catch {
      return;
    }
    for (const set of this.clients.values()) {
      for (const c of set) {
        if (c.userId !== userId) continue;
        c.stillAllowed().then(
          (ok) => { if (!ok) c.res.end(); },
          (err: Error) => this.logger.warn({ err: err.message }, 'event stream re-check failed; next beat retries'),
        );
      }
    }
  }

  private deliver(channel: string, message: string) {
    const labId = labIdOfChannel(channel);
    const set = labId ? this.clients.get(labId) : undefined;
    if (!set) return;
    let type: string;
    try {
      type = String((JSON.parse(message) as { type?: unknown }).type ?? 'message');
    } catch {
      return;
    }
    const frame = `event: ${type}\ndata: ${message}\n\n`;
    for (const c of set) c.res.write(frame);
  }
}

const hubs = new WeakMap<Redis, LabEventHub>();

/** The hub of the app built on this Redis connection (one per API process). */
export function labEventHubFor(redis: Redis, logger: Logger): LabEventHub {
  let hub = hubs.get(redis);
  if (!hub) {
    hub = new LabEventHub(redis, logger);
    hubs.set(redis, hub);
  }
  return hub;
}
