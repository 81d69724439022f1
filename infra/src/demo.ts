import fs from 'node:fs';
import path from 'node:path';
import { initOrm, seedDemo } from '@earmark/db';
import { generateTokenSecret } from '@earmark/platform';
import { dataDir } from './paths.js';

const tokenFile = path.join(dataDir, 'demo-ci-token');

/**
 * Seeds the demo scenario once and returns the demo CI token's secret. The secret is
 * stored hashed in the database, so its plain form is kept under .data/ (mode 600)
 * to be printed on every start.
 */
export async function seedDemoScenario(url: string): Promise<string | null> {
  const orm = await initOrm({ url, poolMax: 2 });
  try {
    const secret = generateTokenSecret();
    const { created } = await seedDemo(orm.em.fork(), secret);
    if (created) fs.writeFileSync(tokenFile, secret.token, { mode: 0o600 });
    return fs.existsSync(tokenFile) ? fs.readFileSync(tokenFile, 'utf8').trim() : null;
  } finally {
    await orm.close();
  }
}
