import { SMTPServer } from 'smtp-server';
import { simpleParser, type AddressObject } from 'mailparser';
import type { StoredMail } from '../../shared/api-types.js';

/** A local SMTP server on 127.0.0.1 that keeps every message it receives (development and tests). */
export interface FakeSmtp {
  port: number;
  url: string;
  messages(): StoredMail[];
  clear(): void;
  /** Resolves once `count` messages have arrived (or rejects after `timeoutMs`). */
  waitFor(count: number, timeoutMs?: number): Promise<StoredMail[]>;
  close(): Promise<void>;
}

function addresses(a: AddressObject | AddressObject[] | undefined): string[] {
  if (!a) return [];
  return (Array.isArray(a) ? a : [a]).flatMap((o) => o.value.map((v) => v.address ?? '').filter(Boolean));
}

export async function startFakeSmtp(port = 0): Promise<FakeSmtp> {
  const store: StoredMail[] = [];
  let nextId = 1;
  const waiters: (() => void)[] = [];
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS'],
    logger: false,
    onData(stream, _session, callback) {
      simpleParser(stream)
        .then((mail) => {
          store.push({
            id: nextId++,
            receivedAt: new Date().toISOString(),
            from: addresses(mail.from).join(', '),
            to: addresses(mail.to),
            subject: mail.subject ?? '',
            text: mail.text ?? '',
            html: typeof mail.html === 'string' ? mail.html : null,
            messageId: mail.messageId ?? null,
          });
          waiters.splice(0).forEach((w) => w());
          callback();
        })
        .catch((err: Error) => callback(err));
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(port, '127.0.0.1', () => resolve());
  });
  const address = server.server.address();
  const actualPort = typeof address === 'object' && address ? address.port : port;
  return {
    port: actualPort,
    url: `smtp://127.0.0.1:${actualPort}`,
    messages: () => [...store],
    clear: () => {
      store.length = 0;
    },
    waitFor(count, timeoutMs = 5000) {
      return new Promise((resolve, reject) => {
        const timer = setTimeout(() => reject(new Error(`only ${store.length} of ${count} messages arrived`)), timeoutMs);
        const check = () => {
          if (store.length >= count) {
            clearTimeout(timer);
            resolve([...store]);
          } else waiters.push(check);
        };
        check();
      });
    },
    close: () => new Promise((resolve) => server.close(() => resolve())),
  };
}
