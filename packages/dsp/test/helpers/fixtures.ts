import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

/** Directory of the committed numpy/scipy reference fixtures. */
export const FIXTURE_DIR = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'reference', 'fixtures');

/** Reads one fixture written by packages/dsp/reference/generate_fixtures.py. */
export function loadFixture<T>(name: string, dir: string = FIXTURE_DIR): T {
  return JSON.parse(readFileSync(join(dir, name), 'utf8')) as T;
}
