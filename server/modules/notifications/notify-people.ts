import { Queue, type ConnectionOptions } from 'bullmq';
import type { Redis } from 'ioredis';
import { JOB_NAMES, QUEUE_NAMES, notifyJobId, type NotifyJobData } from '../../../shared/contracts/jobs.ts';
import { Membership } from '../../db/models/index.ts';

/**
 * Retry a mail server's hiccup with exponential backoff (2 s … 32 s); keep failed sends a month so they can be
 * looked at. The request that caused the mail never waits for SMTP.
 */
const notifyJobOptions = {
  attempts: 6,
  backoff: { type: 'exponential', delay: 2_000 },
  removeOnComplete: { age: 7 * 24 * 3600, count: 10_000 },
  removeOnFail: { age: 30 * 24 * 3600 },
} as const;

const queues = new WeakMap<object, Queue>();

/** The notify queue on an existing Redis client (the API's), made once per client so no connection is added. */
export function notifyQueueOn(connection: Redis): Queue {
  let queue = queues.get(connection);
  if (!queue) {
    queue = new Queue(QUEUE_NAMES.notify, { connection, defaultJobOptions: notifyJobOptions });
    queue.on('error', () => {});
    queues.set(connection, queue);
  }
  return queue;
}

/** A notify queue with its own connection (the worker's main thread); the caller closes it. */
export function createNotifyQueue(connection: ConnectionOptions): Queue {
  const queue = new Queue(QUEUE_NAMES.notify, { connection, defaultJobOptions: notifyJobOptions });
  queue.on('error', () => {});
  return queue;
}

export interface NotifyEvent {
  kind: NotifyJobData['kind'];
  labId: string;
  shotId: string;
  eventId: string;
  recipientIds: (string | null | undefined)[];
  error?: string;
}

/** Queues one mail per distinct recipient; job ids make a repeated report of the same event add nothing. */
export async function notifyPeople(queue: Queue, event: NotifyEvent): Promise<number> {
  const ids = [...new Set(event.recipientIds.filter((x): x is string => !!x))];
  const jobs = ids.map((recipientId) => {
    const data: NotifyJobData = { kind: event.kind, recipientId, labId: event.labId, shotId: event.shotId, eventId: event.eventId, error: event.error?.slice(0, 2000) };
    return { name: JOB_NAMES.notify, data, opts: { jobId: notifyJobId(data) } };
  });
  if (jobs.length > 0) await queue.addBulk(jobs);
  return jobs.length;
}

/** The lab's reviewers, who hear of every review request. */
export async function reviewersOf(labId: string): Promise<string[]> {
  const rows = await Membership.findAll({ where: { labId, role: 'reviewer' }, attributes: ['userId'] });
  return rows.map((r) => r.userId as string);
}

/**
 * Queues notifications from inside a request without ever failing it or making it wait on a Redis that is away:
 * at most `waitMs` is spent; a notification that could not be queued is logged and lost (the audit trail keeps
 * the event itself).
 */
export async function notifySafely(
  queue: Queue,
  event: NotifyEvent | (() => Promise<NotifyEvent>),
  log: (err: Error) => void,
  waitMs = 2_000,
): Promise<void> {
  const work = (async () => notifyPeople(queue, typeof event === 'function' ? await event() : event))();
  // Logged once, whether it fails within the wait or after it.
  const settled = work.then(() => undefined, (err: Error) => log(err));
  let timer: NodeJS.Timeout | undefined;
  const timeout = new Promise<void>((resolve) => {
    timer = setTimeout(resolve, waitMs);
    timer.unref();
  });
  await Promise.race([settled, timeout]);
  clearTimeout(timer);
}
