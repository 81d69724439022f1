import { MaskDocument, StimulusSpec } from '@earmark/contracts';
import { demoProjects } from '@earmark/db';
import { evaluateMask, stimulusAsPlayed } from '@earmark/dsp';
import { DEMO_BUILDS } from '../src/demo-story.js';
import { demoCaptureAudio, seedOf } from '../src/demo-captures.js';
const cases = new Map(demoProjects[0].testCases.map((c) => [c.key as string, c]));
const t0 = performance.now();
for (const b of DEMO_BUILDS) {
  const out: string[] = [];
  for (const c of b.captures) {
    const tc = cases.get(c.testCase)!;
    const spec = StimulusSpec.parse(tc.stimulus);
    const x = demoCaptureAudio(spec, c, seedOf(`${b.sha}/${c.testCase}/${c.target}`));
    if (!tc.mask) { out.push(`${c.testCase}:nomask`); continue; }
    const ev = evaluateMask({ capture: { sampleRate: 48000, channels: [x] }, reference: stimulusAsPlayed(spec), transferMethod: spec.kind === 'sweep' ? 'deconvolution' : 'h1' } as never, MaskDocument.parse({ checks: tc.mask }));
    out.push(`${c.testCase.split('.')[0]}/${c.target.slice(0,4)}:${ev.verdict}[${ev.checks.map((k) => `${k.id}=${k.margin === null || k.margin === undefined ? 'x' : k.margin.toFixed(2)}${k.worstHz ? '@' + Math.round(k.worstHz) : ''}`).join(' ')}]`);
  }
  console.log((b.hoursAgo / 24).toFixed(1).padStart(5), b.branch.padEnd(24), b.label.padEnd(26), out.join('  '));
}
console.log(((performance.now() - t0) / 1000).toFixed(1), 's');
