import pg from 'pg';
import { DEMO_PASSWORD, demoUsers } from '@earmark/db';
import { ENGINE_VERSION } from '@earmark/dsp';

/**
 * A demo history judged by an older engine is judged again by this one when `npm start` runs:
 * as the demo QA manager, each approved mask revision with older verdicts re-evaluates the
 * demo project's builds (the same route a QA manager uses). Each capture page then shows what
 * the new engine changed and why (engine x → y, per check: before and after).
 */
export async function reevaluateStaleDemoVerdicts(databaseUrl: string, apiUrl: string, log: (l: string) => void): Promise<void> {
  const client = new pg.Client({ connectionString: databaseUrl });
  await client.connect();
  let stale: { project: string; test_case: string; revision: number; verdicts: string; engines: string }[];
  try {
    ({ rows: stale } = await client.query(
      `select p.key as project, tc.key as test_case, mr.revision, count(*)::text as verdicts, string_agg(distinct v.engine_version, ', ') as engines
         from verdict v
         join mask_revision mr on mr.id = v.mask_revision_id and mr.state = 'approved'
         join test_case tc on tc.id = mr.test_case_id
         join project p on p.id = tc.project_id
        where v.engine_version <> $1
          and not exists (select 1 from verdict newer where newer.capture_id = v.capture_id and newer.engine_version = $1)
        group by p.key, tc.key, mr.revision`,
      [ENGINE_VERSION],
    ));
  } finally {
    await client.end();
  }
  if (stale.length === 0) return;
  const qa = demoUsers.find((u) => u.role === 'qa_manager');
  if (!qa) return;
  const login = await fetch(`${apiUrl}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email: qa.email, password: DEMO_PASSWORD }) });
  if (!login.ok) {
    log(`could not sign in as ${qa.email} to re-evaluate the demo history (${login.status}); use the Re-evaluate button on the masks page.`);
    return;
  }
  const { accessToken } = (await login.json()) as { accessToken: string };
  for (const s of stale) {
    log(`Re-evaluating ${s.verdicts} ${s.project}/${s.test_case} verdicts of engine ${s.engines} with engine ${ENGINE_VERSION} (mask rev ${s.revision})…`);
    const res = await fetch(`${apiUrl}/api/projects/${s.project}/test-cases/${s.test_case}/masks/${s.revision}/reevaluate`, {
      method: 'POST',
      headers: { authorization: `Bearer ${accessToken}`, 'content-type': 'application/json' },
      body: JSON.stringify({ scope: 'last-n', builds: 100 }),
    });
    if (!res.ok) log(`re-evaluation of ${s.test_case} rev ${s.revision} was refused: ${res.status} ${await res.text()}`);
  }
}
