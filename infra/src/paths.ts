import path from 'node:path';
import { fileURLToPath } from 'node:url';

/** The repository root (infra/src/../..). */
export const repoRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
/** Private, gitignored state: database clusters, secrets, logs, object store. */
export const dataDir = path.join(repoRoot, '.data');
