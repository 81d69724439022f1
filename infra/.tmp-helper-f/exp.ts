import { MaskDocument, StimulusSpec } from '@earmark/contracts';
import { demoProjects } from '@earmark/db';
import { evaluateMask, stimulusAsPlayed, createSeededRandom } from '@earmark/dsp';
import { addNoise, applyBiquad, clip, delay, peakingEqCoefficients, scaleDb } from '@earmark/dsp/testing';

const p = demoProjects[0];
const tc = (k: string) => p.testCases.find((c) => c.key === k)!;
function judge(key: string, x: Float64Array) {
  const c = tc(key);
  const spec = StimulusSpec.parse(c.stimulus);
  const ref = stimulusAsPlayed(spec);
  const mask = MaskDocument.parse({ checks: c.mask!.filter((m) => m.id !== 'analysis-energy') });
  const ev = evaluateMask({ capture: { sampleRate: 48000, channels: [x] }, reference: ref, transferMethod: spec.kind === 'sweep' ? 'deconvolution' : 'h1' } as never, mask);
  return { verdict: ev.verdict, reason: ev.reason, checks: ev.checks.map((ch) => `${ch.id}:${ch.pass}:${ch.margin?.toFixed?.(3)}:${ch.worstHz ?? ''}${ch.error ? ' ERR ' + ch.error : ''}`) };
}
const sweep = StimulusSpec.parse(tc('eq.music.sweep').stimulus);
const played = stimulusAsPlayed(sweep).channels[0]!;
const base = (seed: number, lat = 24) => addNoise(delay(played, lat), -110, seed);
function unit(x: Float64Array, seed: number) {
  const r = createSeededRandom(seed);
  let y = x;
  for (const f of [150, 900, 3500, 11000]) y = applyBiquad(y, peakingEqCoefficients(48000, f * (1 + 0.2 * r.nextGaussian()), 0.3 * r.nextGaussian(), 1.2));
  return y;
}
const t0 = performance.now();
console.log('clean', judge('eq.music.sweep', base(1)));
for (let u = 1; u <= 4; u++) console.log('unit', u, judge('eq.music.sweep', unit(base(u), 100 + u)));
console.log('bump', judge('eq.music.sweep', applyBiquad(unit(base(5), 105), peakingEqCoefficients(48000, 12500, 2.6, 3))));
for (const g of [0.6, 0.9, 1.2, 1.5, 1.8]) console.log('drift', g, judge('eq.music.sweep', applyBiquad(unit(base(6), 106), peakingEqCoefficients(48000, 70, g, 0.8))));
console.log('latency', judge('eq.music.sweep', unit(base(7, 600), 107)));
{
  const x = unit(base(8), 108).slice();
  const n = Math.round(0.2 * 48000);
  for (let i = 0; i < n + 4800; i++) x[i]! *= 10 ** (13 / 20);
  console.log('clip', judge('eq.music.sweep', clip(x, 1)));
}
console.log('noise-only', judge('eq.music.sweep', addNoise(new Float64Array(played.length + 24), -60, 9)));
console.log('truncated', judge('eq.music.sweep', base(10).slice(0, 48000)));
const tone = stimulusAsPlayed(StimulusSpec.parse(tc('level.tone.997').stimulus)).channels[0]!;
console.log('tone-clean', judge('level.tone.997', addNoise(delay(tone, 24), -110, 11)));
console.log('tone-missing', judge('level.tone.997', addNoise(new Float64Array(tone.length), -90, 12)));
console.log(((performance.now() - t0) / 1000).toFixed(1), 's');
