import http from 'node:http';
import type { AddressInfo } from 'node:net';
import type { ReadyReport } from '@earmark/contracts';
import type { Registry } from 'prom-client';

export interface MetricsServerOptions {
  host: string;
  /** 0 picks a free port (tests); the chosen one is returned. */
  port: number;
  registry: Registry;
  live: () => boolean;
  ready: () => Promise<ReadyReport>;
}

export interface MetricsServer {
  port: number;
  close(): Promise<void>;
}

/**
 * The operations port, apart from the product's: `GET /metrics` (Prometheus text format),
 * `GET /livez` and `GET /readyz`. Plain node:http, so it keeps answering whatever the API's
 * middleware does, and nothing on it needs credentials (bind it to a private address).
 */
export async function startMetricsServer(opts: MetricsServerOptions): Promise<MetricsServer> {
  const server = http.createServer((req, res) => {
    answer(req, res, opts).catch((error: unknown) => {
      if (!res.headersSent) send(res, 500, 'text/plain; charset=utf-8', `${error instanceof Error ? error.message : String(error)}\n`);
      else res.destroy();
    });
  });
  // Scrapers keep connections open; an idle one must not hold up close().
  server.keepAliveTimeout = 5_000;
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(opts.port, opts.host, () => {
      server.off('error', reject);
      resolve();
    });
  });
  return {
    port: (server.address() as AddressInfo).port,
    close: () =>
      new Promise<void>((resolve, reject) => {
        server.close((error) => (error ? reject(error) : resolve()));
        server.closeIdleConnections();
      }),
  };
}

async function answer(req: http.IncomingMessage, res: http.ServerResponse, opts: MetricsServerOptions): Promise<void> {
  const path = (req.url ?? '/').split('?')[0];
  if (path !== '/metrics' && path !== '/livez' && path !== '/readyz') {
    send(res, 404, 'text/plain; charset=utf-8', 'Not found: this port serves /metrics, /livez and /readyz.\n');
    return;
  }
  if (req.method !== 'GET' && req.method !== 'HEAD') {
    res.setHeader('Allow', 'GET, HEAD');
    send(res, 405, 'text/plain; charset=utf-8', 'Only GET and HEAD.\n');
    return;
  }
  if (path === '/metrics') {
    send(res, 200, opts.registry.contentType, await opts.registry.metrics());
  } else if (path === '/livez') {
    const live = opts.live();
    send(res, live ? 200 : 503, 'application/json', JSON.stringify({ live }));
  } else {
    const report = await opts.ready();
    send(res, report.ready ? 200 : 503, 'application/json', JSON.stringify(report));
  }
}

function send(res: http.ServerResponse, status: number, contentType: string, body: string): void {
  res.writeHead(status, { 'Content-Type': contentType, 'Cache-Control': 'no-store', 'Content-Length': Buffer.byteLength(body) });
  res.end(res.req.method === 'HEAD' ? undefined : body);
}
