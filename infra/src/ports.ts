import net from 'node:net';

/** True when nothing listens on 127.0.0.1:port. */
export function isPortFree(port: number, host = '127.0.0.1'): Promise<boolean> {
  return new Promise((resolve) => {
    const server = net.createServer();
    server.once('error', () => resolve(false));
    server.once('listening', () => server.close(() => resolve(true)));
    server.listen(port, host);
  });
}

/** Fails with a message that names the port, what wanted it and how to change it. */
export async function assertPortFree(port: number, what: string, envName: string): Promise<void> {
  if (!(await isPortFree(port))) {
    throw new Error(
      `Port ${port} on 127.0.0.1 is already in use, so ${what} cannot start. ` +
        `Stop whatever listens there (e.g. an earlier \`npm start\`), or choose another port with ${envName}=<port>.`,
    );
  }
}

/** Resolves once something accepts connections on host:port, or rejects after timeoutMs. */
export async function waitForPort(port: number, timeoutMs: number, host = '127.0.0.1'): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const ok = await new Promise<boolean>((resolve) => {
      const socket = net.connect(port, host);
      socket.once('connect', () => { socket.destroy(); resolve(true); });
      socket.once('error', () => resolve(false));
    });
    if (ok) return;
    if (Date.now() > deadline) throw new Error(`Nothing answered on ${host}:${port} within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 100));
  }
}
