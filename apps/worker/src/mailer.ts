import nodemailer, { type Transporter } from 'nodemailer';

export interface Mailer {
  send(message: { to: string; subject: string; text: string }): Promise<void>;
  close(): void;
}

/** SMTP through nodemailer (locally the SMTP fake; in production the organisation's relay). */
export function createMailer(opts: { host: string; port: number; from: string }): Mailer {
  const transport: Transporter = nodemailer.createTransport({
    host: opts.host,
    port: opts.port,
    secure: false,
    ignoreTLS: true,
    connectionTimeout: 5000,
    greetingTimeout: 5000,
    socketTimeout: 10000,
  });
  return {
    async send({ to, subject, text }) {
      await transport.sendMail({ from: opts.from, to, subject, text });
    },
    close: () => transport.close(),
  };
}
