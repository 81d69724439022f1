import net from 'node:net';

export interface TcpCut {
  /** host:port clients connect to instead of the real server. */
  port: number;
  /**
   * What clients see when their server restarts: every open connection is reset at once, and
   * new ones are refused for `downMs`, then accepted again.
   */
  outage(downMs: number): Promise<void>;
  close(): Promise<void>;
}

/**
 * A TCP pass-through in front of a server (here the test PostgreSQL). The test cluster is shared
 * by every test file and by other runs, so it is never restarted for real: an outage of this
 * proxy is a restart as the processes behind it see one.
 */
export async function startTcpCut(target: { host: string; port: number }): Promise<TcpCut> {
  const sockets = new Set<net.Socket>();
  let down = false;
  const server = net.createServer((client) => {
    if (down) {
      client.destroy();
      return;
    }
    const upstream = net.connect(target.port, target.host);
    sockets.add(client);
    sockets.add(upstream);
    const drop = () => {
      client.destroy();
      upstream.destroy();
      sockets.delete(client);
      sockets.delete(upstream);
    };
    client.on('error', drop).on('close', drop);
    upstream.on('error', drop).on('close', drop);
    client.pipe(upstream);
    upstream.pipe(client);
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  return {
    port: (server.address() as net.AddressInfo).port,
    async outage(downMs) {
      down = true;
      for (const s of sockets) s.resetAndDestroy();
      sockets.clear();
      await new Promise((r) => setTimeout(r, downMs));
      down = false;
    },
    async close() {
      for (const s of sockets) s.destroy();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}
