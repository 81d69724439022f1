import { fork, type ChildProcess } from 'node:child_process';
import { fileURLToPath } from 'node:url';

export interface TcpRelay {
  /** Where clients connect instead of the target. */
  host: string;
  port: number;
  /** Connections accepted so far, by the client's source address. */
  connectionsFrom(): Record<string, number>;
}

export interface TcpRelays {
  /** Listens on `listen` (port 0: any free one) and pipes each connection both ways to `target`. */
  relay(listen: { host: string; port?: number }, target: { host: string; port: number }): Promise<TcpRelay>;
  close(): Promise<void>;
}

type FromRelay = { type: 'accepted'; id: number; source: string } | { type: 'listening'; id: number; port: number } | { type: 'failed'; id: number; message: string };

/**
 * TCP relays for simulated hosts: each listens on an address in the root namespace (a host's
 * gateway) and carries connections to a service that listens on 127.0.0.1 only, such as the
 * shared test PostgreSQL, whose configuration stays untouched. They run in one child process
 * (tcp-relay.mjs), not in the test's, so a busy test never stalls every query of every host.
 * Connections are counted by source address: that shows which hosts really used the service.
 */
export async function startTcpRelays(): Promise<TcpRelays> {
  const child: ChildProcess = fork(fileURLToPath(new URL('./tcp-relay.mjs', import.meta.url)), [], { execArgv: [], env: {}, stdio: ['ignore', 'inherit', 'inherit', 'ipc'] });
  const counts = new Map<number, Map<string, number>>();
  const pending = new Map<number, { resolve: (port: number) => void; reject: (error: Error) => void }>();
  const exited = new Promise<void>((resolve) => child.once('exit', () => resolve()));
  child.on('message', (m: FromRelay) => {
    if (m.type === 'accepted') {
      const byId = counts.get(m.id)!;
      byId.set(m.source, (byId.get(m.source) ?? 0) + 1);
    } else if (m.type === 'listening') pending.get(m.id)?.resolve(m.port);
    else pending.get(m.id)?.reject(new Error(`relay ${m.id} cannot listen: ${m.message}`));
  });
  void exited.then(() => {
    for (const p of pending.values()) p.reject(new Error('the relay process exited'));
  });
  let nextId = 0;
  return {
    async relay(listen, target) {
      const id = nextId++;
      counts.set(id, new Map());
      const port = await new Promise<number>((resolve, reject) => {
        pending.set(id, { resolve, reject });
        child.send({ type: 'listen', id, host: listen.host, port: listen.port ?? 0, target });
      }).finally(() => pending.delete(id));
      return { host: listen.host, port, connectionsFrom: () => Object.fromEntries(counts.get(id)!) };
    },
    async close() {
      if (child.connected) child.disconnect();
      await exited;
    },
  };
}
