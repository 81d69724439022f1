import { buildServerPackages } from '../build-js.js';
import { ensureWebBuilt } from '../web-build.js';

const log = (line: string) => console.log(`earmark: ${line}`);

/**
 * `npm run build`: the JavaScript production processes run (`npm run serve:api`,
 * `npm run serve:worker`, `npm run admin`) and the web app's static files.
 */
export async function buildCommand(): Promise<number> {
  await buildServerPackages(log);
  ensureWebBuilt(log, { force: true });
  log('built. Start with `npm run serve:api` and `npm run serve:worker` (docs/operations.md).');
  return 0;
}
