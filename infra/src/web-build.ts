import fs from 'node:fs';
import path from 'node:path';
import { repoRoot } from './paths.js';
import { run } from './shell.js';

const webDir = path.join(repoRoot, 'apps', 'web');
export const webDist = path.join(webDir, 'dist');

function newestMtime(dir: string): number {
  let newest = 0;
  for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
    const full = path.join(dir, entry.name);
    newest = Math.max(newest, entry.isDirectory() ? newestMtime(full) : fs.statSync(full).mtimeMs);
  }
  return newest;
}

/** Builds the web app with Vite when dist/ is missing or older than its sources. */
export function ensureWebBuilt(log: (l: string) => void, opts: { force?: boolean } = {}): void {
  const index = path.join(webDist, 'index.html');
  const sources = Math.max(
    newestMtime(path.join(webDir, 'src')),
    ...['index.html', 'vite.config.ts'].map((f) => fs.statSync(path.join(webDir, f)).mtimeMs),
    newestMtime(path.join(repoRoot, 'packages', 'contracts', 'src')),
  );
  if (!opts.force && fs.existsSync(index) && fs.statSync(index).mtimeMs >= sources) return;
  log('Building the web app (vite build)…');
  run(process.execPath, [path.join(webDir, 'node_modules', 'vite', 'bin', 'vite.js'), 'build', '--logLevel', 'warn'], { cwd: webDir });
}
