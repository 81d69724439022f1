import { randomBytes } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { dataDir } from './paths.js';

export interface LocalSecrets {
  pgPassword: string;
  jwtSecret: string;
}

const secretsFile = path.join(dataDir, 'secrets.json');

/** Development secrets, generated once and kept under .data/ (mode 600, gitignored). */
export function loadLocalSecrets(): LocalSecrets {
  // .data holds passwords, the demo token and the captures: created owner-only. An existing one
  // keeps its mode: as root, a cluster placed inside it needs the postgres user to pass through
  // (cluster-place.ts), and its secrets are 0600 regardless.
  fs.mkdirSync(dataDir, { recursive: true, mode: 0o700 });
  if (fs.existsSync(secretsFile)) {
    fs.chmodSync(secretsFile, 0o600);
    return JSON.parse(fs.readFileSync(secretsFile, 'utf8')) as LocalSecrets;
  }
  const secrets: LocalSecrets = {
    pgPassword: randomBytes(18).toString('base64url'),
    jwtSecret: randomBytes(48).toString('base64url'),
  };
  fs.writeFileSync(secretsFile, JSON.stringify(secrets, null, 2), { mode: 0o600 });
  return secrets;
}
