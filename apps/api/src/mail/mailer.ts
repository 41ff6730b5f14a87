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

/** Sends through SMTP (in development and tests: the local fake mail server). */
export function smtpMailer(opts: { host: string; port: number; from: string }, log: Logger): Mailer {
  const transport = nodemailer.createTransport({
    host: opts.host,
    port: opts.port,
    secure: false,
    ignoreTLS: opts.host === '127.0.0.1' || opts.host === 'localhost',
  });
  return {
    async send(mail) {
      await transport.sendMail({ from: opts.from, to: mail.to, subject: mail.subject, text: mail.text });
      log.info({ to: mail.to, subject: mail.subject }, 'mail sent');
    },
  };
}
