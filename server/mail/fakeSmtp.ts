/**
 * A local SMTP server for development and tests. It accepts any message on loopback,
 * parses it with mailparser and stores it in `captured_mail`, where tests read it and
 * site admins see it in the app. Nothing is relayed anywhere.
 *
 * The row is written before the SMTP "250 OK" goes back, so by the time the sender's
 * sendMail() resolves the message is already readable from the database.
 */
import { SMTPServer } from 'smtp-server';
import { simpleParser } from 'mailparser';
import type { AddressInfo } from 'node:net';
import type { Knex } from 'knex';
import { capturedMailRepo } from '../repositories/capturedMail';

export interface FakeSmtp {
  port: number;
  host: string;
  stop(): Promise<void>;
}

export interface FakeSmtpOptions {
  /** 0 picks a free port */
  port: number;
  knex: Knex;
  /** loopback by default: the fake must never face a network */
  host?: string;
  /** largest message accepted, bytes */
  maxBytes?: number;
}

export async function startFakeSmtp(opts: FakeSmtpOptions): Promise<FakeSmtp> {
  const host = opts.host ?? '127.0.0.1';
  const repo = capturedMailRepo(opts.knex);
  const server = new SMTPServer({
    // no TLS and no AUTH: a loopback sink; nodemailer then sends in plain text
    disabledCommands: ['STARTTLS', 'AUTH'],
    authOptional: true,
    // no reverse DNS for the client address: it only slows every connection down
    disableReverseLookup: true,
    logger: false,
    size: opts.maxBytes ?? 5 * 1024 * 1024,
    banner: 'Tetrawell development mail sink',
    onData(stream, session, callback) {
      simpleParser(stream)
        .then(async (parsed) => {
          const envelopeTo = session.envelope.rcptTo.map((r) => r.address.toLowerCase());
          const from = session.envelope.mailFrom ? session.envelope.mailFrom.address : '';
          await repo.insert({
            from,
            to: envelopeTo,
            subject: parsed.subject ?? '',
            text: parsed.text ?? '',
            html: typeof parsed.html === 'string' ? parsed.html : null,
            messageId: parsed.messageId ?? null,
          });
          callback();
        })
        .catch((err: unknown) => callback(err instanceof Error ? err : new Error(String(err))));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(opts.port, host, () => {
      server.off('error', reject);
      resolve();
    });
  });
  // keep a late error from crashing the process; the sender sees the failed delivery
  server.on('error', () => {});
  const address = server.server.address() as AddressInfo;
  return {
    port: address.port,
    host,
    stop: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
