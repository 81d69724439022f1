// TEMPORARY (task A): measures the quota sum and the retention query on a larger history; deleted after.
import { Target, TestCase } from '@earmark/db';
import { useSeededDatabase } from '@earmark/db/testing';
import { RETENTION_CANDIDATES_SQL, applyRetention, retentionCutoff, storageUsedBytes } from '@earmark/domain';
import type { ObjectStore } from '@earmark/platform';
import { pino } from 'pino';
import { it } from 'vitest';

const seeded = useSeededDatabase(4);

it('measures', async () => {
  const em = seeded.orm.em.fork();
  const p = seeded.fixture.project.id;
  for (let i = 0; i < 10; i++) em.create(TestCase, { project: p, key: `m.case${i}`, name: 'm', stimulus: { kind: 'silence' } });
  for (let i = 0; i < 2; i++) em.create(Target, { project: p, key: `m-t${i}`, name: 'm' });
  await em.flush();
  const conn = seeded.orm.em.fork().getConnection();
  const BUILDS = 2000;
  // 2000 builds over 2 years (one every ~8.8 h), 80 % pass, 15 % fail, 5 % error; 20 captures each (10 cases x 2 targets) = 40,000 captures.
  await conn.execute(`insert into build (id, created_at, project_id, sha, status, updated_at)
     select gen_random_uuid(), now() - (g * interval '8.76 hours'), ?, lpad(to_hex(g), 8, '0'),
            case when g % 20 < 16 then 'pass' when g % 20 < 19 then 'fail' else 'error' end, now()
       from generate_series(1, ${BUILDS}) g`, [p]);
  await conn.execute(`insert into capture (id, created_at, project_id, build_id, test_case_id, target_id, object_key, sha256, size_bytes, format, sample_rate, channel_count, frames, status)
     select gen_random_uuid(), b.created_at, b.project_id, b.id, tc.id, t.id, 'captures/m/' || b.sha || '/' || tc.key || t.key || '.wav', repeat('0', 64), 1000000, '{}', 48000, 1, 48000, 'done'
       from build b cross join test_case tc cross join target t where b.project_id = ? and tc.key like 'm.%' and t.key like 'm-%'`, [p]);
  await conn.execute(`insert into verdict (id, created_at, capture_id, outcome, engine_version, waiver_basis)
     select gen_random_uuid(), c.created_at, c.id, case when b.status = 'pass' then 'pass' when b.status = 'error' then 'error' else (case when random() < 0.3 then 'fail' else 'pass' end) end, '1.0.0', ''
       from capture c join build b on b.id = c.build_id where b.project_id = ?`, [p]);
  await conn.execute('analyze');
  const [{ n }] = await conn.execute<{ n: string }[]>('select count(*) n from capture');
  console.log('captures', n);

  const t0 = performance.now();
  for (let i = 0; i < 20; i++) await storageUsedBytes(seeded.orm.em.fork(), [p]);
  console.log('quota sum ms/each', ((performance.now() - t0) / 20).toFixed(2));
  const plan = await conn.execute<{ 'QUERY PLAN': string }[]>(`explain analyze select sum(c.size_bytes) from capture c where c.project_id = ? and c.purged_at is null`, [p]);
  console.log(plan.map((r) => r['QUERY PLAN']).join('\n'));

  const now = new Date();
  const params = [retentionCutoff(90, now), retentionCutoff(365, now), 200];
  const sel = await conn.execute<{ 'QUERY PLAN': string }[]>(`explain analyze ${RETENTION_CANDIDATES_SQL}`, params);
  console.log(sel.map((r) => r['QUERY PLAN']).slice(-3).join('\n'));

  const store = { delete: async () => {}, async *listPages() { yield []; } } as unknown as ObjectStore;
  const t1 = performance.now();
  let total = 0;
  for (;;) {
    const r = await applyRetention(seeded.orm.em, store, pino({ level: 'silent' }), { passedDays: 90, failedDays: 365 });
    total += r.purged;
    if (r.purged === 0) break;
  }
  const ms = performance.now() - t1;
  console.log('purged', total, 'in ms', ms.toFixed(0), 'per s', (total / (ms / 1000)).toFixed(0));
  const t2 = performance.now();
  const idle = await applyRetention(seeded.orm.em, store, pino({ level: 'silent' }), { passedDays: 90, failedDays: 365 });
  console.log('idle run', idle.purged, 'ms', (performance.now() - t2).toFixed(0));
}, 600_000);
