import net from 'node:net';

export interface RefusingSmtp {
  /** Recipients of the messages it accepted. */
  accepted: string[];
  close(): Promise<void>;
}

/**
 * A minimal SMTP relay (RFC 5321 commands only as far as nodemailer uses them) that answers
 * `550` — refused for good — to RCPT TO for any address in `refuse`, and accepts the rest.
 * The maildev fake cannot refuse a message, so the permanent-refusal path needs this.
 */
export async function startRefusingSmtp(port: number, refuse: readonly string[]): Promise<RefusingSmtp> {
  const accepted: string[] = [];
  const sockets = new Set<net.Socket>();
  const server = net.createServer((socket) => {
    sockets.add(socket);
    socket.on('close', () => sockets.delete(socket));
    socket.on('error', () => socket.destroy());
    let buffer = '';
    let inData = false;
    let recipient = '';
    socket.write('220 refusing-relay ready\r\n');
    socket.on('data', (chunk: Buffer) => {
      buffer += chunk.toString('latin1');
      for (;;) {
        if (inData) {
          const end = buffer.indexOf('\r\n.\r\n');
          if (end < 0) return;
          buffer = buffer.slice(end + 5);
          inData = false;
          accepted.push(recipient);
          socket.write('250 queued\r\n');
          continue;
        }
        const eol = buffer.indexOf('\r\n');
        if (eol < 0) return;
        const line = buffer.slice(0, eol);
        buffer = buffer.slice(eol + 2);
        const verb = line.slice(0, 4).toUpperCase();
        if (verb === 'EHLO' || verb === 'HELO') socket.write('250 refusing-relay\r\n');
        else if (verb === 'MAIL' || verb === 'RSET' || verb === 'NOOP') socket.write('250 ok\r\n');
        else if (verb === 'RCPT') {
          recipient = /<([^>]*)>/.exec(line)?.[1] ?? '';
          socket.write(refuse.includes(recipient) ? '550 5.1.1 mailbox unavailable\r\n' : '250 ok\r\n');
        } else if (verb === 'DATA') {
          inData = true;
          socket.write('354 end with <CRLF>.<CRLF>\r\n');
        } else if (verb === 'QUIT') {
          socket.end('221 bye\r\n');
        } else socket.write('502 not implemented\r\n');
      }
    });
  });
  await new Promise<void>((resolve, reject) => server.once('error', reject).listen(port, '127.0.0.1', resolve));
  return {
    accepted,
    async close() {
      for (const s of sockets) s.destroy();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}
