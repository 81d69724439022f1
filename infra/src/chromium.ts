import fs from 'node:fs';
import { isRoot, run } from './shell.js';

export const CHROMIUM_PATH = '/usr/bin/chromium';

/** Installs Debian's Chromium for the browser tests when it is missing (never a browser download). */
export function ensureChromium(log: (l: string) => void): void {
  if (fs.existsSync(CHROMIUM_PATH)) return;
  if (!isRoot()) throw new Error('Chromium is missing; install it with `sudo apt-get install -y chromium`.');
  log('Installing Chromium from Debian packages for the browser tests…');
  run('apt-get', ['update', '-qq']);
  run('apt-get', ['install', '-y', '-qq', 'chromium'], { env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } });
}
