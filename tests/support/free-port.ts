import net from 'node:net';

/** A port free on 127.0.0.1 right now (for servers that cannot listen on port 0). */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

/**
 * Runs `start` with fresh free ports until it binds: a port found free can be taken by a
 * parallel test file before the server listens on it.
 */
export async function onFreePorts<T>(count: number, start: (ports: number[]) => Promise<T>, attempts = 5): Promise<T> {
  for (let attempt = 1; ; attempt += 1) {
    const ports: number[] = [];
    for (let i = 0; i < count; i += 1) ports.push(await freePort());
    try {
      return await start(ports);
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code !== 'EADDRINUSE' || attempt >= attempts) throw error;
    }
  }
}
