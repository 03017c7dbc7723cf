import nodemailer from 'nodemailer';
import type { Config } from '../config.js';

/** A message ready for the wire: attachments already read from object storage. */
export interface WireMail {
  from: string;
  to: string;
  subject: string;
  text: string;
  html?: string;
  attachments: { filename: string; content: Buffer; contentType: string }[];
  /** Stable id so a receiving server (and tests) can tell repeats of the same outbox row apart. */
  messageId: string;
}

/** The one thin module in front of SMTP, so tests can swap it. */
export interface MailTransport {
  send(mail: WireMail): Promise<{ messageId: string }>;
}

export function createSmtpTransport(smtp: Config['smtp']): MailTransport {
  // One connection per message (no pool): a restarted SMTP server is picked up without state to reset.
  const transporter = nodemailer.createTransport({
    host: smtp.host,
    port: smtp.port,
    secure: smtp.secure,
    auth: smtp.user ? { user: smtp.user, pass: smtp.pass ?? '' } : undefined,
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 30_000,
  });
  return {
    async send(mail) {
      const info = await transporter.sendMail(mail);
      return { messageId: info.messageId };
    },
  };
}
