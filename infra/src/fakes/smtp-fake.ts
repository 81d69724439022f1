import { MailDev } from 'maildev';

export interface SmtpFake {
  smtpPort: number;
  inboxUrl: string;
  close(): Promise<void>;
}

/** The local SMTP fake with a web inbox (maildev) on loopback. */
export async function startSmtpFake(opts: { smtpPort: number; webPort: number }): Promise<SmtpFake> {
  const maildev = new MailDev({ smtp: opts.smtpPort, web: opts.webPort, ip: '127.0.0.1', silent: true, disableWeb: false });
  await maildev.start();
  return { smtpPort: opts.smtpPort, inboxUrl: `http://127.0.0.1:${opts.webPort}/`, close: () => maildev.stop() };
}
