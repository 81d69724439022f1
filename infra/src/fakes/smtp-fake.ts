import { MailDev } from 'maildev';

export interface SmtpFake {
  smtpPort: number;
  inboxUrl: string;
  close(): Promise<void>;
}

/** The local SMTP fake with a web inbox (maildev), both on loopback only. */
export async function startSmtpFake(opts: { smtpPort: number; webPort: number }): Promise<SmtpFake> {
  const maildev = new MailDev({ smtp: opts.smtpPort, web: opts.webPort, ip: '127.0.0.1', webIp: '127.0.0.1', silent: true, disableWeb: false });
  try {
    await maildev.start();
  } catch (error) {
    // One of its two servers may be up: close it so a retry on other ports leaves nothing behind.
    await maildev.stop().catch(() => {});
    throw error;
  }
  return { smtpPort: opts.smtpPort, inboxUrl: `http://127.0.0.1:${opts.webPort}/`, close: () => maildev.stop() };
}
