import nodemailer from 'nodemailer';

export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html?: string;
  /** A stable Message-ID lets a retry after an unknown outcome be recognised downstream. */
  messageId?: string;
  headers?: Record<string, string>;
}

export interface Mailer {
  send(mail: OutgoingMail): Promise<{ messageId: string }>;
  close(): void;
}

/** Sends through nodemailer to `smtpUrl` (a hosted service, or the local fake in development and tests). */
export function createMailer(smtpUrl: string, from: string): Mailer {
  // Give up on an unreachable mail service within seconds (nodemailer waits 2 minutes by default), so
  // a request that sends mail answers with a clear message instead of hanging.
  const transport = nodemailer.createTransport({ url: smtpUrl, connectionTimeout: 10_000, greetingTimeout: 10_000, socketTimeout: 30_000 });
  return {
    async send(mail) {
      const info = await transport.sendMail({ from, ...mail });
      return { messageId: info.messageId };
    },
    close: () => transport.close(),
  };
}
