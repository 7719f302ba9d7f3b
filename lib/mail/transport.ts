/**
 * The SMTP transport (nodemailer). Messages carry their inline images as `data:` URLs inside the HTML part; the
 * transport turns them into `cid:` attachments when it sends (nodemailer's `attachDataUrls`), so a queued
 * message in `outgoing_mail` is complete in its own row.
 */
import nodemailer from 'nodemailer';
import { mailConfigFromEnv, type MailConfig } from './config';

/** What a message needs to go out. `html` may hold `data:` image URLs; they are sent as inline attachments. */
export interface OutgoingMessage {
  to: string;
  subject: string;
  text: string;
  html?: string | null;
  from?: string;
  /** Extra attachments (rarely needed: inline images travel inside `html`). */
  attachments?: { filename: string; content: Buffer; contentType: string; cid?: string }[];
}

/** The part of a transport the outbox uses; a nodemailer transporter satisfies it. */
export interface MailTransport {
  sendMail(message: {
    from: string;
    to: string;
    subject: string;
    text: string;
    html?: string;
    attachments?: OutgoingMessage['attachments'];
  }): Promise<{ messageId?: string }>;
  /** Default sender of this transport. */
  from?: string;
  close?(): void;
}

/** A mail transport with its default sender; usable wherever a `MailTransport` is expected. */
export interface Mailer extends MailTransport {
  transport: MailTransport;
  from: string;
  send(message: OutgoingMessage): Promise<{ messageId: string | null }>;
  close(): void;
}

/** Builds a nodemailer SMTP transport from a validated config (or from the environment). */
export function createMailer(config: MailConfig = mailConfigFromEnv()): Mailer {
  const transporter = nodemailer.createTransport(
    {
      host: config.host,
      port: config.port,
      secure: config.secure,
      auth: config.auth,
      // The local development server has no certificate; never downgrade a real server.
      ignoreTLS: config.mode === 'local',
      connectionTimeout: 10_000,
      greetingTimeout: 10_000,
      socketTimeout: 30_000,
      attachDataUrls: true,
    },
    { from: config.from },
  );
  const transport: MailTransport = {
    sendMail: async (m) => {
      const info = await transporter.sendMail(m);
      return { messageId: info.messageId };
    },
    from: config.from,
    close: () => transporter.close(),
  };
  return {
    transport,
    from: config.from,
    sendMail: transport.sendMail,
    async send(message) {
      const info = await transport.sendMail(toTransportMessage(message, config.from));
      return { messageId: info.messageId ?? null };
    },
    close: () => transporter.close(),
  };
}

/** Fills in the sender and drops empty parts. */
export function toTransportMessage(message: OutgoingMessage, defaultFrom: string): Parameters<MailTransport['sendMail']>[0] {
  return {
    from: message.from ?? defaultFrom,
    to: message.to,
    subject: message.subject,
    text: message.text,
    ...(message.html ? { html: message.html } : {}),
    ...(message.attachments?.length ? { attachments: message.attachments } : {}),
  };
}
