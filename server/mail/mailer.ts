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
  const transport = nodemailer.createTransport(smtpUrl);
  return {
    async send(mail) {
      const info = await transport.sendMail({ from, ...mail });
      return { messageId: info.messageId };
    },
    close: () => transport.close(),
  };
}
