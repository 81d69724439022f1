import { StimulusSpec } from '@earmark/contracts';
import { demoProjects } from '@earmark/db';
import { encodeWav, stimulusAsPlayed } from '@earmark/dsp';
import { addNoise, applyBiquad, clip, delay, peakingEqCoefficients, scaleDb } from '@earmark/dsp/testing';

type Shape = 'clean' | 'bump-8k' | 'quiet' | 'clipped';

interface DemoCapture {
  project: 'kestrel-buds';
  testCase: string;
  target: string;
  shape: Shape;
}

interface DemoBuild {
  /** The demo CI token belongs to kestrel-buds, so the demo history is that project's. */
  project: 'kestrel-buds';
  sha: string;
  branch: string;
  label: string;
  captures: DemoCapture[];
}

const kestrel = (testCase: string, shape: Shape, target = 'evt2-48k'): DemoCapture => ({ project: 'kestrel-buds', testCase, target, shape });
const allClean = [kestrel('eq.music.sweep', 'clean'), kestrel('level.tone.997', 'clean'), kestrel('noise.idle', 'clean')];

/** Fernwick's recent history: a few passing nightlies, then regressions an engineer must triage. */
const DEMO_BUILDS: DemoBuild[] = [
  { project: 'kestrel-buds', sha: '4c1d9e07a2', branch: 'main', label: 'nightly 407', captures: allClean },
  { project: 'kestrel-buds', sha: '7f30b2c815', branch: 'main', label: 'nightly 408', captures: allClean },
  { project: 'kestrel-buds', sha: '9a6e41d3c0', branch: 'main', label: 'nightly 409', captures: [...allClean, kestrel('eq.music.sweep', 'clean', 'dvt1-48k')] },
  { project: 'kestrel-buds', sha: 'b82f07e91d', branch: 'main', label: 'nightly 410', captures: [kestrel('eq.music.sweep', 'bump-8k'), kestrel('level.tone.997', 'clean'), kestrel('noise.idle', 'clean')] },
  { project: 'kestrel-buds', sha: 'c4e5a1f260', branch: 'feature/limiter-retune', label: 'limiter retune', captures: [kestrel('eq.music.sweep', 'clipped'), kestrel('level.tone.997', 'quiet')] },
  { project: 'kestrel-buds', sha: 'd19b3f8e44', branch: 'main', label: 'nightly 411', captures: [kestrel('eq.music.sweep', 'bump-8k'), kestrel('level.tone.997', 'clean'), kestrel('noise.idle', 'clean'), kestrel('voice.uplink.sweep', 'clean')] },
];

function captureFor(spec: StimulusSpec, shape: Shape, seed: number): Float64Array {
  const played = stimulusAsPlayed(spec);
  const fs = played.sampleRate;
  const x = played.channels[0]!;
  // A path with half a millisecond of latency and a noise floor near a 24-bit converter's.
  const base = spec.kind === 'silence' ? addNoise(x, -110, seed) : addNoise(delay(x, 24), -110, seed);
  switch (shape) {
    case 'clean':
      return base;
    case 'bump-8k':
      return applyBiquad(base, peakingEqCoefficients(fs, 8000, 2.4, 2));
    case 'quiet':
      return scaleDb(base, -6);
    case 'clipped':
      return clip(scaleDb(base, 14), 1);
  }
}

/**
 * Sends the demo history through the real pipeline (API upload → object store → worker
 * → verdict), so a newcomer's first look at the dashboard is populated. Runs once: when the
 * first demo project already has builds it does nothing.
 */
export async function seedDemoBuilds(apiUrl: string, token: string, log: (l: string) => void): Promise<void> {
  const headers = { authorization: `Bearer ${token}` };
  const existing = await fetch(`${apiUrl}/api/v1/projects/kestrel-buds/builds?pageSize=1`, { headers });
  if (!existing.ok || ((await existing.json()) as { total: number }).total > 0) return;
  log('Sending the demo builds through the pipeline…');
  const specs = new Map<string, StimulusSpec>();
  for (const p of demoProjects) for (const c of p.testCases) specs.set(`${p.key}/${c.key}`, StimulusSpec.parse(c.stimulus));
  let seed = 1;
  for (const build of DEMO_BUILDS) {
    await fetch(`${apiUrl}/api/v1/projects/${build.project}/builds`, {
      method: 'POST',
      headers: { ...headers, 'content-type': 'application/json' },
      body: JSON.stringify({ sha: build.sha, branch: build.branch, label: build.label }),
    });
    for (const c of build.captures) {
      const spec = specs.get(`${c.project}/${c.testCase}`);
      if (!spec) continue;
      const samples = captureFor(spec, c.shape, seed++);
      const wav = encodeWav([samples], spec.sampleRate, { bitsPerSample: 24 });
      const res = await fetch(`${apiUrl}/api/v1/projects/${c.project}/builds/${build.sha}/captures?testCase=${c.testCase}&target=${c.target}`, {
        method: 'POST',
        headers: { ...headers, 'content-type': 'audio/wav', 'idempotency-key': `demo-${build.sha}-${c.testCase}-${c.target}` },
        body: Buffer.from(wav),
      });
      if (!res.ok) log(`demo capture ${build.sha}/${c.testCase}/${c.target} was refused: ${res.status} ${await res.text()}`);
    }
  }
}

export { DEMO_BUILDS };
