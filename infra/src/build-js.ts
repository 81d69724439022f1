import fs from 'node:fs';
import path from 'node:path';
import { build } from 'esbuild';
import { dataDir, repoRoot } from './paths.js';

/** The packages a production process loads: transpiled to `build/` beside their `src/`. */
export const SERVER_PACKAGES = ['packages/contracts', 'packages/dsp', 'packages/db', 'packages/platform', 'packages/domain', 'apps/api', 'apps/worker', 'apps/cli'];

/**
 * The export condition that selects a package's built JavaScript (`build/…`) over its TypeScript
 * source. Production processes run `node --conditions=earmark-built`; everything else (tests, tsx,
 * Vite) resolves the `default` condition, the source.
 */
export const BUILT_CONDITION = 'earmark-built';

function filesUnder(dir: string): string[] {
  return fs.readdirSync(dir, { withFileTypes: true, recursive: true }).filter((e) => e.isFile()).map((e) => path.join(e.parentPath, e.name));
}

const isSource = (file: string) => file.endsWith('.ts') && !file.endsWith('.d.ts') && !file.endsWith('.test.ts');

/**
 * Transpiles each server package file by file (no bundling: every package keeps resolving its own
 * dependencies from its own node_modules, as pnpm lays them out) and copies the files that are not
 * TypeScript (the compute-thread bootstrap, the migration snapshot). Types are checked by `tsc -b`,
 * not here. Returns the number of files written.
 */
export async function buildServerPackages(log: (line: string) => void): Promise<number> {
  let written = 0;
  for (const pkg of SERVER_PACKAGES) {
    const src = path.join(repoRoot, pkg, 'src');
    const out = path.join(repoRoot, pkg, 'build');
    fs.rmSync(out, { recursive: true, force: true });
    const files = filesUnder(src);
    const sources = files.filter(isSource);
    await build({
      entryPoints: sources,
      outdir: out,
      outbase: src,
      bundle: false,
      format: 'esm',
      platform: 'node',
      target: 'node20',
      sourcemap: true,
      logLevel: 'warning',
    });
    for (const file of files.filter((f) => !f.endsWith('.ts'))) {
      const target = path.join(out, path.relative(src, file));
      fs.mkdirSync(path.dirname(target), { recursive: true });
      fs.copyFileSync(file, target);
    }
    written += sources.length;
  }
  log(`transpiled ${written} files of ${SERVER_PACKAGES.length} packages to build/`);
  return written;
}

function newestMtime(dir: string): number {
  return Math.max(0, ...filesUnder(dir).map((f) => fs.statSync(f).mtimeMs));
}

/**
 * Builds the server packages when a build is missing or older than any of their sources (tests that
 * run the built processes). Test files run in parallel processes: one lock makes the first rebuild
 * and the others wait and then find the build fresh, instead of deleting it under each other.
 */
export async function ensureServerBuilt(log: (line: string) => void): Promise<void> {
  await withBuildLock(async () => {
    const stale = SERVER_PACKAGES.some((pkg) => {
      const marker = path.join(repoRoot, pkg, 'build', 'index.js');
      const built = fs.existsSync(marker) ? fs.statSync(marker).mtimeMs : 0;
      return built < newestMtime(path.join(repoRoot, pkg, 'src'));
    });
    if (stale) await buildServerPackages(log);
  });
}

/** A directory made with mkdir (atomic) is the lock; one left by a crashed run is taken over after two minutes. */
async function withBuildLock<T>(fn: () => Promise<T>): Promise<T> {
  const lock = path.join(dataDir, 'server-build.lock');
  fs.mkdirSync(dataDir, { recursive: true });
  for (;;) {
    try {
      fs.mkdirSync(lock);
      break;
    } catch (error) {
      if ((error as NodeJS.ErrnoException).code !== 'EEXIST') throw error;
      const age = Date.now() - (fs.statSync(lock, { throwIfNoEntry: false })?.mtimeMs ?? Date.now());
      if (age > 120_000) fs.rmSync(lock, { recursive: true, force: true });
      else await new Promise((resolve) => setTimeout(resolve, 100));
    }
  }
  try {
    return await fn();
  } finally {
    fs.rmSync(lock, { recursive: true, force: true });
  }
}
