// Load for verdict-wait.bench.ts, in its own process so its CPU is not counted as the API's.
// argv: mode (wait | poll), base URL, token, database URL, capture ids (comma-separated).
import pg from 'pg';

const [mode, base, token, dbUrl, idList] = process.argv.slice(2);
const ids = idList.split(',');
const headers = { authorization: `Bearer ${token}` };
const get = async (id, query = '') => {
  const res = await fetch(`${base}/api/v1/captures/${id}${query}`, { headers });
  const body = await res.json();
  if (!res.ok) throw new Error(`HTTP ${res.status}: ${JSON.stringify(body)}`);
  return body;
};

const db = new pg.Client({ connectionString: dbUrl });
await db.connect();
// Verdicts arrive in batches of 20 every 100 ms, starting 1 s in (as the worker would record them).
const recordVerdicts = async () => {
  await new Promise((resolve) => setTimeout(resolve, 1000));
  for (let i = 0; i < ids.length; i += 20) {
    const batch = ids.slice(i, i + 20);
    await db.query(`update capture set status = 'done' where id = any($1::uuid[])`, [batch]);
    await db.query(`insert into verdict (id, created_at, capture_id, outcome, engine_version) select gen_random_uuid(), now(), id, 'pass', 'bench' from unnest($1::uuid[]) id`, [batch]);
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
};

const started = Date.now();
let requests = 0;
if (mode === 'wait') {
  const answers = Promise.all(ids.map(async (id) => { requests += 1; return get(id, '?wait=30'); }));
  await recordVerdicts();
  const bodies = await answers;
  const missing = bodies.filter((b) => !b.verdict).length;
  if (missing) throw new Error(`${missing} waits answered without a verdict`);
} else {
  // What CI did before: every capture polled every second until its verdict is there.
  const pending = new Set(ids);
  const verdicts = recordVerdicts();
  while (pending.size) {
    await Promise.all([...pending].map(async (id) => { requests += 1; if ((await get(id)).verdict) pending.delete(id); }));
    if (pending.size) await new Promise((resolve) => setTimeout(resolve, 1000));
  }
  await verdicts;
}
await db.end();
process.stdout.write(JSON.stringify({ requests, ms: Date.now() - started }));
