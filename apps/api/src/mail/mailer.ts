import nodemailer, { type Transporter } from 'nodemailer';

export interface MailAttachment {
  filename: string;
  content: Buffer;
  contentType: string;
}

export interface MailMessage {
  to: string;
  subject: string;
  /** The plain-text part. */
  text: string;
  /** The HTML part (simple, inline-styled, no images): every message has both (see `composeMail`). */
  html: string;
  /** Where the recipient's reply goes (a branch's office address), when not to the sender. */
  replyTo?: string;
  /** Extra header fields, e.g. `Auto-Submitted: auto-generated` on digests. */
  headers?: Record<string, string>;
  attachments?: MailAttachment[];
}

export interface Mailer {
  send(message: MailMessage): Promise<{ messageId: string }>;
}

/** A mailer over any nodemailer transport (SMTP in the app; a stream transport in tests that read the MIME). */
export function createTransportMailer(transport: Transporter, from: string): Mailer {
  return {
    async send(message) {
      const info = await transport.sendMail({ from, ...message });
      return { messageId: String(info.messageId) };
    },
  };
}

/** A nodemailer transport to an SMTP URL (the local sink by default). */
export function createSmtpMailer(smtpUrl: string, from: string): Mailer {
  return createTransportMailer(nodemailer.createTransport(smtpUrl), from);
}
