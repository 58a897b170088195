import type { MikroORM } from '@mikro-orm/postgresql';
import { simpleParser, type AddressObject } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import { MailMessage } from '../entities';
import { logger } from '../logger';

const MAX_MESSAGE_BYTES = 10 * 1024 * 1024;

export interface MailCatcher {
  port: number;
  close(): Promise<void>;
}

/**
 * The local SMTP catcher: accepts every message on 127.0.0.1 and stores it (raw and parsed) in
 * PostgreSQL, where the admin's Outbox reads it. It stands in for a real relay: point SMTP_URL
 * elsewhere in production and do not start it.
 */
export async function startMailCatcher(orm: MikroORM, port: number, host = '127.0.0.1'): Promise<MailCatcher> {
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    size: MAX_MESSAGE_BYTES,
    logger: false,
    banner: 'Tendara mail catcher',
    onData(stream, _session, callback) {
      const chunks: Buffer[] = [];
      stream.on('data', (chunk: Buffer) => chunks.push(chunk));
      stream.on('end', () => {
        if ((stream as unknown as { sizeExceeded?: boolean }).sizeExceeded) {
          return callback(Object.assign(new Error('Message too large'), { responseCode: 552 }));
        }
        storeMessage(orm, Buffer.concat(chunks))
          .then(() => callback())
          .catch((err: unknown) => {
            logger.error({ err }, 'mail catcher could not store a message');
            callback(Object.assign(new Error('Could not store the message'), { responseCode: 451 }));
          });
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, host, () => resolve());
  });
  const address = server.server.address();
  const actual = typeof address === 'object' && address ? address.port : port;
  logger.info({ port: actual }, 'mail catcher listening');
  return {
    port: actual,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}

async function storeMessage(orm: MikroORM, raw: Buffer): Promise<void> {
  const parsed = await simpleParser(raw);
  const em = orm.em.fork();
  em.create(MailMessage, {
    messageId: parsed.messageId ?? null,
    fromAddress: parsed.from?.text ?? '',
    toAddresses: addresses(parsed.to),
    subject: parsed.subject ?? '(no subject)',
    text: parsed.text ?? '',
    html: typeof parsed.html === 'string' ? parsed.html : null,
    sentAt: parsed.date ?? new Date(),
    raw,
  });
  await em.flush();
}

function addresses(to: AddressObject | AddressObject[] | undefined): string[] {
  const list = Array.isArray(to) ? to : to ? [to] : [];
  return list.flatMap((a) => a.value.map((v) => v.address ?? v.name)).filter((v): v is string => !!v);
}
