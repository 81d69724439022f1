import { MaskDocument, StimulusSpec } from '@earmark/contracts';
import { demoProjects } from '@earmark/db';
import { evaluateMask, stimulusAsPlayed } from '@earmark/dsp';
import { addNoise, clip, delay } from '@earmark/dsp/testing';
const p = demoProjects[0];
const tc = (k: string) => p.testCases.find((c) => c.key === k)!;
function judge(key: string, x: Float64Array) {
  const c = tc(key);
  const spec = StimulusSpec.parse(c.stimulus);
  const ev = evaluateMask({ capture: { sampleRate: 48000, channels: [x] }, reference: stimulusAsPlayed(spec), transferMethod: 'deconvolution' } as never, MaskDocument.parse({ checks: c.mask!.filter((m) => m.id !== 'analysis-energy') }));
  return { verdict: ev.verdict, reason: ev.reason, checks: ev.checks.map((ch) => `${ch.id}:${ch.pass}:${ch.margin}${ch.error ? ' ERR ' + ch.error : ''}`) };
}
const played = stimulusAsPlayed(StimulusSpec.parse(tc('eq.music.sweep').stimulus)).channels[0]!;
const voice = stimulusAsPlayed(StimulusSpec.parse(tc('voice.uplink.sweep').stimulus)).channels[0]!;
const wrong = new Float64Array(played.length + 24); wrong.set(voice, 24);
console.log('wrong-stimulus', judge('eq.music.sweep', addNoise(wrong, -110, 3)));
console.log('silence', judge('eq.music.sweep', addNoise(new Float64Array(played.length + 24), -100, 4)));
const x = addNoise(delay(played, 24), -110, 5).slice();
for (let i = 0; i < 0.12 * 48000; i++) x[i]! *= 10 ** (12 / 20);
console.log('clip', judge('eq.music.sweep', clip(x, 1)));
