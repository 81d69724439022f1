import { DEMO_PASSWORD } from '@earmark/db';

/**
 * The people's part of the demo story, done through the same API routes the dashboard uses,
 * after every demo capture has its verdict:
 * - the engineer asks to waive the DVT1 boards' idle-noise finding until the board respin, and
 *   the QA manager approves it (its expiry lies ahead, so the covered captures pass with waiver);
 * - the engineer drafts a stricter level.tone.997 revision for the production line, submits it
 *   for review and runs its impact on the history, which the QA managers then find computed.
 */

export const WAIVER_DAYS_AHEAD = 24;
export const REVIEW_CASE = 'level.tone.997';

const PROJECT = '/api/projects/kestrel-buds';

interface Session {
  call<T>(method: string, path: string, body?: unknown): Promise<T>;
}

async function signIn(apiUrl: string, email: string): Promise<Session> {
  const login = await fetch(`${apiUrl}/api/auth/login`, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ email, password: DEMO_PASSWORD }) });
  if (!login.ok) throw new Error(`could not sign in as ${email}: ${login.status} ${await login.text()}`);
  const { accessToken } = (await login.json()) as { accessToken: string };
  return {
    async call<T>(method: string, path: string, body?: unknown): Promise<T> {
      const res = await fetch(`${apiUrl}${path}`, {
        method,
        headers: { authorization: `Bearer ${accessToken}`, ...(body === undefined ? {} : { 'content-type': 'application/json' }) },
        ...(body === undefined ? {} : { body: JSON.stringify(body) }),
      });
      if (!res.ok) throw new Error(`${method} ${path} as ${email}: ${res.status} ${await res.text()}`);
      return (await res.json()) as T;
    },
  };
}

async function approveDvt1NoiseWaiver(engineer: Session, qa: Session, now: Date): Promise<void> {
  const { items } = await engineer.call<{ items: { id: string; checkId: string }[] }>('GET', `${PROJECT}/findings?testCase=noise.idle&target=dvt1-48k&pageSize=50`);
  const finding = items.find((f) => f.checkId === 'idle-level');
  if (!finding) throw new Error('the DVT1 idle-noise finding is missing, so there is nothing to waive');
  const until = new Date(now.getTime() + WAIVER_DAYS_AHEAD * 86_400_000).toISOString().slice(0, 10);
  const waiver = await engineer.call<{ id: string }>('POST', `${PROJECT}/findings/${finding.id}/waivers`, {
    reason: 'DVT1 boards still carry the old LDO, whose hiss sits about 1.4 dB above the idle-noise limit. The DVT2 respin replaces it; until then the DVT1 units stay on the rig for everything else.',
    until,
    targetOnly: true,
  });
  await qa.call('POST', `${PROJECT}/waivers/${waiver.id}/approve`, { comment: 'Accepted for DVT1 only, until the DVT2 boards arrive.' });
}

async function submitStricterToneRevision(engineer: Session, builds: number): Promise<void> {
  const base = `${PROJECT}/test-cases/${REVIEW_CASE}/masks`;
  const draft = await engineer.call<{ revision: number }>('POST', base, {
    target: null,
    note: 'Production-line limits: level within ±0.15 dB and THD+N below −80 dB, as the factory test will use them.',
    checks: [
      { id: 'level', kind: 'level', metric: 'rms-dbfs', min: -20.15, max: -19.85 },
      { id: 'thd', kind: 'distortion', metric: 'thd-percent', max: 0.05 },
      { id: 'thdn', kind: 'distortion', metric: 'thdn-db', max: -80 },
    ],
  });
  await engineer.call('POST', `${base}/${draft.revision}/submit`);
  const run = await engineer.call<{ id: string }>('POST', `${base}/${draft.revision}/impact`, { builds });
  for (const deadline = Date.now() + 300_000; ; ) {
    const { state, error } = await engineer.call<{ state: string; error: string | null }>('GET', `${base}/${draft.revision}/impact/${run.id}`);
    if (state === 'done') return;
    if (state === 'error') throw new Error(`the impact of ${REVIEW_CASE} revision ${draft.revision} failed: ${error}`);
    if (Date.now() > deadline) throw new Error(`the impact of ${REVIEW_CASE} revision ${draft.revision} did not finish within 5 minutes`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

/** Runs the people's part of the story; `builds` is how many builds the impact covers. */
export async function playDemoWorkflow(apiUrl: string, builds: number, now = new Date()): Promise<void> {
  const engineer = await signIn(apiUrl, 'engineer@fernwick.test');
  const qa = await signIn(apiUrl, 'qa@fernwick.test');
  await approveDvt1NoiseWaiver(engineer, qa, now);
  await submitStricterToneRevision(engineer, builds);
}
