import { ConfigError } from './config-error.js';

/** Failures an operator fixes outside the code: printed as one sentence, without a stack trace. */
const OPERATOR_ERRORS = new Set(['ConfigError', 'MigrationsPendingError']);

/**
 * Ends a process that could not start: one clear line on stderr (the variable at fault, the
 * migrations to run, the service that did not answer) and exit code 1. Anything else keeps its
 * stack, since it is a defect.
 */
export function exitOnStartupFailure(processName: string, error: unknown): never {
  const prefix = `earmark ${processName}: cannot start:`;
  if (error instanceof ConfigError || (error instanceof Error && OPERATOR_ERRORS.has(error.name))) {
    console.error(`${prefix} ${error.message}`);
  } else if (isConnectionRefused(error)) {
    console.error(`${prefix} ${error.address ?? 'a service'}:${error.port ?? ''} refused the connection (${error.code}); is it running, and is the address in the configuration right?`);
  } else {
    // The stack only: an error object's own fields may carry what it failed on (a URL with its password).
    console.error(`${prefix} unexpected error\n${error instanceof Error ? (error.stack ?? error.message) : String(error)}`);
  }
  process.exit(1);
}

function isConnectionRefused(error: unknown): error is NodeJS.ErrnoException & { address?: string; port?: number } {
  const code = (error as NodeJS.ErrnoException | null)?.code;
  return code === 'ECONNREFUSED' || code === 'ENOTFOUND' || code === 'EHOSTUNREACH' || code === 'ETIMEDOUT';
}
