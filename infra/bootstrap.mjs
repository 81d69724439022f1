#!/usr/bin/env node
// Entry point of `npm start`, `npm test`, `npm run bench`, `npm run earmark` and `npm run db`.
// Plain JavaScript with no dependencies: it installs them (pnpm at the pinned version,
// brought by npm) when they are missing or the lockfile changed, then runs the
// TypeScript command through tsx in this same process.
import { createHash } from 'node:crypto';
import { spawnSync } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const PNPM = 'pnpm@12.4.2';
const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const stampFile = path.join(root, 'node_modules', '.earmark-install-stamp');

function installFingerprint() {
  const hash = createHash('sha256');
  for (const f of ['pnpm-lock.yaml', 'pnpm-workspace.yaml', 'package.json']) hash.update(fs.readFileSync(path.join(root, f)));
  return hash.digest('hex');
}

function ensureDependencies() {
  const fingerprint = installFingerprint();
  if (fs.existsSync(stampFile) && fs.readFileSync(stampFile, 'utf8') === fingerprint) return;
  console.error(`Installing dependencies with ${PNPM}…`);
  const res = spawnSync('npx', ['-y', '--loglevel=error', PNPM, 'install', '--frozen-lockfile'], { cwd: root, stdio: 'inherit', env: { ...process.env, npm_config_loglevel: 'error' } });
  if (res.status !== 0) {
    console.error('earmark: installing dependencies failed (see above).');
    process.exit(res.status ?? 1);
  }
  fs.writeFileSync(stampFile, fingerprint);
}

const [command, ...args] = process.argv.slice(2);
ensureDependencies();
const { register } = await import(pathToFileURL(path.join(root, 'infra', 'node_modules', 'tsx', 'dist', 'esm', 'api', 'index.mjs')).href);
register();
if (command === 'earmark') {
  process.argv = [process.argv[0], 'earmark', ...args];
  await import(pathToFileURL(path.join(root, 'apps', 'cli', 'src', 'main.ts')).href);
} else {
  process.argv = [process.argv[0], 'infra', command ?? '', ...args];
  await import(pathToFileURL(path.join(root, 'infra', 'src', 'main.ts')).href);
}
