import pg from 'pg';
import type { Logger } from 'pino';

export interface PgListener {
  /** True while LISTEN is in force; notifications sent while it is false are lost. */
  readonly listening: boolean;
  /** Settles after the first attempt to listen, whether it worked or not. */
  readonly ready: Promise<void>;
  close(): Promise<void>;
}

export interface PgListenerOptions {
  connectionString: string;
  channel: string;
  onNotify(payload: string): void;
  /** Called after every (re)connect: anything sent while disconnected was missed, so re-read. */
  onListening(): void;
  logger: Logger;
  /** Pause before reconnecting after a lost connection. */
  reconnectDelayMs?: number;
}

/**
 * One dedicated connection per process that LISTENs on a channel and reconnects when the
 * connection drops. Starts in the background: the process runs (answering without holding)
 * while the database is away.
 */
export function startPgListener(options: PgListenerOptions): PgListener {
  const reconnectDelayMs = options.reconnectDelayMs ?? 2_000;
  let client: pg.Client | null = null;
  let listening = false;
  let closed = false;
  let retryTimer: NodeJS.Timeout | undefined;

  const scheduleReconnect = () => {
    if (closed || retryTimer) return;
    retryTimer = setTimeout(() => {
      retryTimer = undefined;
      void connect();
    }, reconnectDelayMs);
    retryTimer.unref();
  };

  async function connect(): Promise<void> {
    const next = new pg.Client({ connectionString: options.connectionString, application_name: 'earmark-api-listen', connectionTimeoutMillis: 5_000 });
    client = next;
    const lost = (error?: Error) => {
      if (client !== next) return;
      client = null;
      listening = false;
      if (!closed) options.logger.warn({ err: error }, `LISTEN ${options.channel} lost; held requests answer at their deadline until it is back`);
      void next.end().catch(() => {});
      scheduleReconnect();
    };
    next.on('error', lost);
    next.on('end', () => lost());
    next.on('notification', (message) => {
      if (message.channel === options.channel && message.payload) options.onNotify(message.payload);
    });
    try {
      await next.connect();
      await next.query(`LISTEN ${pg.escapeIdentifier(options.channel)}`);
      if (closed || client !== next) return;
      listening = true;
      options.onListening();
    } catch (error) {
      lost(error as Error);
    }
  }

  const ready = connect();
  return {
    ready,
    get listening() {
      return listening;
    },
    async close() {
      closed = true;
      listening = false;
      clearTimeout(retryTimer);
      const current = client;
      client = null;
      await current?.end().catch(() => {});
    },
  };
}
