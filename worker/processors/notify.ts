import { UnrecoverableError, type Job } from 'bullmq';
import { notifyJobData } from '../../shared/contracts/jobs.ts';
import { createMailer, type Mailer } from '../../server/lib/mailer.ts';
import { composeNotification } from '../../server/modules/notifications/compose-notification.ts';
import { workerContext } from '../context.ts';

let mailer: Mailer | undefined;

/**
 * Notification job: compose the e-mail from the database as it is now (so an opt-out made after the event is
 * honoured) and hand it to SMTP. A refused or unreachable mail server throws a plain Error, so BullMQ retries with
 * backoff; a malformed job is unrecoverable. One job is one mail to one person, so a retry never repeats a mail
 * that already went to someone else.
 */
export default async function sendNotification(job: Job): Promise<{ sent: boolean }> {
  const parsed = notifyJobData.safeParse(job.data);
  if (!parsed.success) throw new UnrecoverableError(`bad notification job: ${parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; ')}`);
  const { config } = workerContext();
  const mail = await composeNotification(parsed.data, config.publicUrl);
  if (!mail) return { sent: false };
  mailer ??= createMailer(config);
  await mailer.send(mail);
  return { sent: true };
}
