import nodemailer from 'nodemailer';
import type { Config } from '../config.ts';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
  /** The lab the message is about; the fake outbox shows a lab's admins only their own lab's mail. */
  labId?: string;
}

export interface Mailer {
  send(mail: OutgoingMail): Promise<void>;
  close(): void;
}

/** Sends through SMTP: the local fake server in development and tests, the lab's real relay by configuration. */
export function createMailer(config: Config): Mailer {
  const local = config.mailOutbox === 'fake';
  const transport = nodemailer.createTransport({
    host: config.smtpHost,
    port: config.smtpPort,
    secure: config.smtpSecure,
    // The local fake server speaks plain SMTP on loopback (see ../shared/STACK.md: its built-in certificate expired).
    ignoreTLS: local,
    auth: config.smtpUser ? { user: config.smtpUser, pass: config.smtpPassword ?? '' } : undefined,
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
  });
  return {
    async send(mail) {
      await transport.sendMail({
        from: config.mailFrom,
        to: mail.to,
        subject: mail.subject,
        text: mail.text,
        html: mail.html,
        headers: mail.labId ? { 'X-Gatepost-Lab': mail.labId } : undefined,
      });
    },
    close: () => transport.close(),
  };
}
