import { MaskDocument, StimulusSpec } from '@earmark/contracts';
import { demoProjects } from '@earmark/db';
import { evaluateMask, stimulusAsPlayed, encodeWav } from '@earmark/dsp';
import { DEMO_BUILDS } from '../src/demo-story.js';
import { demoCaptureAudio, seedOf } from '../src/demo-captures.js';
const cases = new Map(demoProjects[0].testCases.map((c) => [c.key as string, c]));
const synth: Record<string, number> = {}, judge: Record<string, number> = {}, count: Record<string, number> = {};
const cpu0 = process.cpuUsage();
for (const b of DEMO_BUILDS) for (const c of b.captures) {
  const tc = cases.get(c.testCase)!;
  const spec = StimulusSpec.parse(tc.stimulus);
  let t = performance.now();
  const x = demoCaptureAudio(spec, c, seedOf(`${b.sha}/${c.testCase}/${c.target}`));
  encodeWav([x], 48000, { bitsPerSample: 24 });
  synth[c.testCase] = (synth[c.testCase] ?? 0) + performance.now() - t;
  count[c.testCase] = (count[c.testCase] ?? 0) + 1;
  if (!tc.mask) continue;
  t = performance.now();
  evaluateMask({ capture: { sampleRate: 48000, channels: [x] }, reference: stimulusAsPlayed(spec), transferMethod: spec.kind === 'sweep' ? 'deconvolution' : 'h1' } as never, MaskDocument.parse({ checks: tc.mask }));
  judge[c.testCase] = (judge[c.testCase] ?? 0) + performance.now() - t;
}
const cpu = process.cpuUsage(cpu0);
console.log({ count, synth, judge, cpuS: (cpu.user + cpu.system) / 1e6 });
