import type { z } from 'zod';
import { ConfigError } from './config-error.js';
import { readEnvironment, resolveSecretFiles, type EnvRecord } from './env-source.js';
import { runtimeModeOf, type RuntimeMode } from './runtime-mode.js';

export interface LoadConfigOptions {
  /** Which process this is, for the message ("api", "worker", "admin"). */
  processName: string;
  /** Variables whose values are secrets: they may come from `NAME_FILE`, and are never echoed. */
  secrets: readonly string[];
}

/**
 * Reads the environment (plus the optional env file and secret files), picks the runtime mode and
 * validates with the process's schema for that mode. Every problem is reported at once, one line
 * per variable, in one ConfigError.
 */
export function loadConfig<S extends z.ZodType>(schemaFor: (mode: RuntimeMode) => S, env: EnvRecord, options: LoadConfigOptions): z.infer<S> & { EARMARK_MODE: RuntimeMode } {
  const merged = resolveSecretFiles(readEnvironment(env), options.secrets);
  // An empty value means "not set": `FOO=` in an env file must not defeat a default.
  const cleaned = Object.fromEntries(Object.entries(merged).filter((e): e is [string, string] => e[1] !== undefined && e[1] !== ''));
  const mode = runtimeModeOf(cleaned);
  const parsed = schemaFor(mode).safeParse(cleaned);
  if (parsed.success) return { ...(parsed.data as object), EARMARK_MODE: mode } as z.infer<S> & { EARMARK_MODE: RuntimeMode };
  const lines: string[] = [];
  const variables: string[] = [];
  for (const issue of parsed.error.issues) {
    const name = issue.path.map(String).join('.') || '(environment)';
    variables.push(name);
    const given = cleaned[name];
    const shown = given === undefined ? 'not set' : options.secrets.includes(name) ? 'value hidden: a secret' : `got ${JSON.stringify(given.length > 80 ? `${given.slice(0, 80)}…` : given)}`;
    // zod's own wording for a missing value ("expected string, received undefined") says less than this.
    const message = given === undefined && issue.code === 'invalid_type' ? 'required' : issue.message;
    lines.push(`${name}: ${message} (${shown})`);
  }
  const where = mode === 'production' ? ' (production mode: no development defaults)' : '';
  throw new ConfigError(`Invalid ${options.processName} configuration${where}:\n  ${lines.join('\n  ')}`, variables);
}
