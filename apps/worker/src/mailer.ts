import nodemailer, { type Transporter } from 'nodemailer';

/** One message: the plain-text part always, the HTML part when the outbox row has one. */
export interface OutgoingMail {
  to: string;
  subject: string;
  text: string;
  html: string | null;
  /** Makes the Message-ID: the same for every attempt at one outbox message, so a repeat is recognisable. */
  messageKey?: string;
}

export interface Mailer {
  send(message: OutgoingMail): Promise<void>;
  close(): void;
}

/** Where mail goes: the relay's URL (production), or the local fake's address (development). */
export type MailRelay = { url: string } | { host: string; port: number };

/**
 * SMTP through nodemailer (locally the SMTP fake; in production the organisation's relay).
 * `from` is EARMARK_MAIL_FROM, e.g. `Earmark <earmark@example.com>`.
 */
export function createMailer(opts: MailRelay & { from: string }): Mailer {
  const timeouts = { connectionTimeout: 5000, greetingTimeout: 5000, socketTimeout: 10000 };
  // A relay URL keeps nodemailer's defaults: TLS for smtps://, STARTTLS whenever the relay offers it.
  // The local fake speaks plain SMTP only.
  const transport: Transporter =
    'url' in opts ? nodemailer.createTransport({ url: opts.url, ...timeouts }) : nodemailer.createTransport({ host: opts.host, port: opts.port, secure: false, ignoreTLS: true, ...timeouts });
  return {
    async send({ to, subject, text, html, messageKey }) {
      // With both parts nodemailer sends multipart/alternative: clients that show no HTML read the text.
      const messageId = messageKey ? `<earmark-${messageKey}@${senderDomain(opts.from)}>` : undefined;
      await transport.sendMail({ from: opts.from, to, subject, text, ...(html ? { html } : {}), ...(messageId ? { messageId } : {}) });
    },
    close: () => transport.close(),
  };
}

/** The domain of `Name <user@domain>` or `user@domain`, for Message-IDs; `earmark.invalid` without one. */
export function senderDomain(from: string): string {
  return /@([^>\s]+)>?\s*$/.exec(from)?.[1] ?? 'earmark.invalid';
}
