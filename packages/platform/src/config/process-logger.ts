import { pino, type Logger } from 'pino';

/** What a log line may carry that must never be written out: credentials in any field or header. */
const REDACT = [
  'password',
  '*.password',
  'secret',
  '*.secret',
  'token',
  '*.token',
  'req.headers.authorization',
  'req.headers.cookie',
  'res.headers["set-cookie"]',
];

/**
 * The one logger every process makes: JSON lines (for a log shipper) or pretty lines (for a
 * terminal), with the process and instance names on every line and credentials redacted.
 */
export function createProcessLogger(opts: { name: string; level: string; format?: 'json' | 'pretty'; instance?: string }): Logger {
  const base = { name: opts.name, level: opts.level, redact: { paths: REDACT, censor: '[redacted]' }, ...(opts.instance ? { base: { pid: process.pid, instance: opts.instance } } : {}) };
  if (opts.format === 'pretty') return pino({ ...base, transport: { target: 'pino-pretty', options: { colorize: process.stdout.isTTY, translateTime: 'SYS:HH:MM:ss.l' } } });
  return pino(base);
}
