import { StimulusSpec } from '@earmark/contracts';
import { demoProjects } from '@earmark/db';
import { encodeWav } from '@earmark/dsp';
import { demoCaptureAudio, seedOf } from './demo-captures.js';
import { DEMO_BUILDS, type DemoBuild, type DemoCapture } from './demo-story.js';
import { playDemoWorkflow } from './demo-workflow.js';

/** Uploads in flight at once: enough to keep two analysis slots busy, few enough for 2 cores. */
const UPLOADS_IN_FLIGHT = 3;
// Generous: 117 analyses take well under a minute on 2 idle cores, many minutes on busy ones.
const JUDGED_WITHIN_MS = 480_000;

export interface DemoSeedSummary {
  builds: number;
  captures: number;
  /** From the first request to the last verdict and the workflow's end. */
  seconds: number;
}

/**
 * Sends the demo history (demo-story.ts) through the real pipeline — API upload → object store
 * → worker → verdict — with each build's `builtAt` spread over six weeks, waits until every
 * capture is judged, then plays the people's part (demo-workflow.ts). Runs once: when
 * kestrel-buds already has builds it does nothing and answers null.
 */
export async function seedDemoBuilds(apiUrl: string, token: string, log: (l: string) => void): Promise<DemoSeedSummary | null> {
  const started = performance.now();
  const headers = { authorization: `Bearer ${token}` };
  const existing = await fetch(`${apiUrl}/api/v1/projects/kestrel-buds/builds?pageSize=1`, { headers });
  if (!existing.ok || ((await existing.json()) as { total: number }).total > 0) return null;
  log(`Sending the demo history (${DEMO_BUILDS.length} builds over six weeks) through the pipeline…`);
  const now = Date.now();
  for (const build of DEMO_BUILDS) {
    const res = await retryingFetch(`${apiUrl}/api/v1/projects/kestrel-buds/builds`, {
      method: 'POST',
      headers: { ...headers, 'content-type': 'application/json' },
      body: JSON.stringify({ sha: build.sha, branch: build.branch, label: build.label, builtAt: new Date(now - build.hoursAgo * 3_600_000).toISOString() }),
    });
    if (!res.ok) throw new Error(`demo build ${build.label} was refused: ${res.status} ${await res.text()}`);
  }
  const uploads = DEMO_BUILDS.flatMap((build) => build.captures.map((capture) => ({ build, capture })));
  let next = 0;
  const uploader = async () => {
    while (next < uploads.length) {
      const { build, capture } = uploads[next++]!;
      await upload(apiUrl, headers, build, capture, log);
    }
  };
  await Promise.all(Array.from({ length: UPLOADS_IN_FLIGHT }, uploader));
  log(`Uploaded ${uploads.length} captures; waiting for their verdicts…`);
  await waitUntilJudged(apiUrl, headers, log);
  await playDemoWorkflow(apiUrl, DEMO_BUILDS.length, new Date(now));
  const summary = { builds: DEMO_BUILDS.length, captures: uploads.length, seconds: (performance.now() - started) / 1000 };
  log(`Demo history ready: ${summary.builds} builds, ${summary.captures} captures judged in ${summary.seconds.toFixed(1)} s.`);
  return summary;
}

const specs = new Map<string, StimulusSpec>(demoProjects[0].testCases.map((c) => [c.key, StimulusSpec.parse(c.stimulus)]));

async function upload(apiUrl: string, headers: Record<string, string>, build: DemoBuild, capture: DemoCapture, log: (l: string) => void): Promise<void> {
  const spec = specs.get(capture.testCase);
  if (!spec) throw new Error(`the demo has no test case ${capture.testCase}`);
  const cell = `${build.sha}/${capture.testCase}/${capture.target}`;
  const wav = encodeWav([demoCaptureAudio(spec, capture, seedOf(cell))], spec.sampleRate, { bitsPerSample: 24 });
  const res = await retryingFetch(`${apiUrl}/api/v1/projects/kestrel-buds/builds/${build.sha}/captures?testCase=${capture.testCase}&target=${capture.target}`, {
    method: 'POST',
    headers: { ...headers, 'content-type': 'audio/wav', 'idempotency-key': `demo-${build.sha}-${capture.testCase}-${capture.target}` },
    body: Buffer.from(wav),
  });
  if (!res.ok) log(`demo capture ${cell} was refused: ${res.status} ${await res.text()}`);
}

/**
 * fetch, tried again when the connection fails before an answer (a kept-alive socket the server
 * closed, a busy machine). Safe: build upserts are idempotent, uploads carry an Idempotency-Key.
 */
async function retryingFetch(url: string, init: RequestInit, attempts = 4): Promise<Response> {
  for (let attempt = 1; ; attempt++) {
    try {
      return await fetch(url, init);
    } catch (error) {
      if (attempt >= attempts) throw error;
      await new Promise((r) => setTimeout(r, 500 * attempt));
    }
  }
}

async function waitUntilJudged(apiUrl: string, headers: Record<string, string>, log: (l: string) => void): Promise<void> {
  let lastReport = Date.now();
  for (const deadline = Date.now() + JUDGED_WITHIN_MS; ; ) {
    const res = await fetch(`${apiUrl}/api/v1/projects/kestrel-buds/builds?pageSize=200`, { headers });
    const { items } = (await res.json()) as { items: { status: string }[] };
    const judged = items.filter((b) => b.status !== 'pending' && b.status !== 'running').length;
    if (items.length >= DEMO_BUILDS.length && judged === items.length) return;
    if (Date.now() > deadline) throw new Error(`the demo captures were not all judged within ${JUDGED_WITHIN_MS / 1000} s (is the worker running?)`);
    if (Date.now() - lastReport > 20_000) {
      log(`${judged} of ${DEMO_BUILDS.length} demo builds judged…`);
      lastReport = Date.now();
    }
    await new Promise((r) => setTimeout(r, 300));
  }
}

export { DEMO_BUILDS };
