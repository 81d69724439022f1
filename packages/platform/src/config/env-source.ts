import fs from 'node:fs';
import { parseEnv } from 'node:util';
import { ConfigError } from './config-error.js';

export type EnvRecord = Record<string, string | undefined>;

/** The variable naming an optional env file (KEY=value lines, `#` comments, quotes as in shell). */
export const ENV_FILE_VAR = 'EARMARK_ENV_FILE';

/**
 * The environment a process is configured from: its own variables, plus those of the env file
 * named by EARMARK_ENV_FILE for names the environment does not set (the environment wins, so a
 * service manager can override one value without editing the file).
 */
export function readEnvironment(env: EnvRecord): EnvRecord {
  const file = env[ENV_FILE_VAR];
  if (!file) return { ...env };
  let text: string;
  try {
    text = fs.readFileSync(file, 'utf8');
  } catch (error) {
    throw new ConfigError(`${ENV_FILE_VAR}: cannot read the env file ${file} (${(error as NodeJS.ErrnoException).code ?? String(error)})`, [ENV_FILE_VAR]);
  }
  return { ...parseEnv(text), ...definedOnly(env) };
}

/**
 * Secrets may come from files (Docker/Kubernetes secrets, systemd credentials): `NAME_FILE` holds
 * the path of a file whose content (without the final newline) is the value of `NAME`.
 */
export function resolveSecretFiles(env: EnvRecord, secretNames: readonly string[]): EnvRecord {
  const out = { ...env };
  for (const name of secretNames) {
    const fileVar = `${name}_FILE`;
    const file = env[fileVar];
    if (!file) continue;
    if (env[name]) throw new ConfigError(`${name} and ${fileVar} are both set; keep one`, [name, fileVar]);
    try {
      out[name] = fs.readFileSync(file, 'utf8').replace(/\r?\n$/, '');
    } catch (error) {
      throw new ConfigError(`${fileVar}: cannot read the secret file ${file} (${(error as NodeJS.ErrnoException).code ?? String(error)})`, [fileVar]);
    }
    if (!out[name]) throw new ConfigError(`${fileVar}: the secret file ${file} is empty`, [fileVar]);
  }
  return out;
}

function definedOnly(env: EnvRecord): Record<string, string> {
  return Object.fromEntries(Object.entries(env).filter((e): e is [string, string] => e[1] !== undefined));
}
