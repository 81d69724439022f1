// Used by the MikroORM CLI only (`pnpm --filter @earmark/db mikro-orm migration:create`);
// the apps build their configuration through createDbConfig with their validated env.
import { createDbConfig } from './config.js';

const url = process.env.EARMARK_DATABASE_URL;
if (!url) throw new Error('EARMARK_DATABASE_URL is not set (run `npm run db -- url` to print it)');

export default createDbConfig({ url });
