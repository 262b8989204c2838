/**
 * Outgoing mail through nodemailer. The transport comes from configuration: a real SMTP
 * host in production, the loopback fake (server/mail/fakeSmtp.ts) in development and tests.
 */
import nodemailer from 'nodemailer';
import type { Logger, SmtpConfig } from '../config';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
}

export interface Mailer {
  /** resolves true once the SMTP server accepted the message, false when sending failed (logged) */
  send(mail: OutgoingMail): Promise<boolean>;
  close(): void;
}

export function createMailer(smtp: SmtpConfig | undefined, from: string, logger: Logger): Mailer {
  if (!smtp) {
    logger.warn('No SMTP server configured: e-mails are logged (subject and recipient only) and dropped.');
    return {
      async send(mail) {
        logger.warn(`Mail not sent (no SMTP configured): "${mail.subject}" to ${mail.to}`);
        return false;
      },
      close() {},
    };
  }
  const transport = nodemailer.createTransport({
    host: smtp.host,
    port: smtp.port,
    secure: smtp.secure ?? false,
    auth: smtp.user ? { user: smtp.user, pass: smtp.pass ?? '' } : undefined,
    // fail fast rather than hold an HTTP request for minutes when the SMTP server is away
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 20_000,
  });
  return {
    async send(mail) {
      try {
        await transport.sendMail({ from, to: mail.to, subject: mail.subject, text: mail.text });
        return true;
      } catch (err) {
        logger.error(`Sending mail "${mail.subject}" to ${mail.to} failed:`, err instanceof Error ? err.message : err);
        return false;
      }
    },
    close() {
      transport.close();
    },
  };
}
