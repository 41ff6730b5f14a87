import nodemailer from 'nodemailer';
import type { Logger } from 'pino';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
}

export interface Mailer {
  send(mail: OutgoingMail): Promise<void>;
}

/**
 * Sends through SMTP (in development and tests: the local fake mail server). Each message is
 * dated by the app's clock, as everything else it says is: under a set clock the outbox shows
 * the e-mail beside the night it is about.
 */
export function smtpMailer(opts: { host: string; port: number; from: string }, log: Logger, clock: () => Date): Mailer {
  const transport = nodemailer.createTransport({
    host: opts.host,
    port: opts.port,
    secure: false,
    ignoreTLS: opts.host === '127.0.0.1' || opts.host === 'localhost',
  });
  return {
    async send(mail) {
      await transport.sendMail({ from: opts.from, to: mail.to, subject: mail.subject, text: mail.text, date: clock() });
      log.info({ to: mail.to, subject: mail.subject }, 'mail sent');
    },
  };
}
