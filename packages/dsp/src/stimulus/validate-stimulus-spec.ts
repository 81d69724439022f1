import type { StimulusSpec } from '@earmark/contracts';
import { StimulusError } from './stimulus-error.js';

/** Same limits as @earmark/contracts (the engine takes only types from there, nothing at run time). */
const MIN_RATE = 8000;
const MAX_RATE = 192000;
const MAX_CHANNELS = 8;
const MAX_SECONDS = 600;
const MAX_TONES = 4096;
const MAX_IMD_RATIO = 100;

function need(ok: boolean, field: string, what: string): void {
  if (!ok) throw new StimulusError('invalid-spec', `The stimulus's ${field} ${what}`);
}

/**
 * Checks a stimulus spec before any sample is computed, so callers that skip the zod schema
 * (tests, the worker) still get a clear error that names the field.
 *
 * @throws StimulusError `invalid-spec` naming the field, or `level-above-full-scale`.
 */
export function validateStimulusSpec(spec: StimulusSpec): void {
  const fs = spec.sampleRate;
  need(Number.isInteger(fs) && fs >= MIN_RATE && fs <= MAX_RATE, 'sampleRate', `must be a whole number of Hz in ${MIN_RATE}…${MAX_RATE}, got ${fs}`);
  need(Number.isInteger(spec.channels) && spec.channels >= 1 && spec.channels <= MAX_CHANNELS, 'channels', `must be 1…${MAX_CHANNELS}, got ${spec.channels}`);
  need(spec.seconds > 0 && spec.seconds <= MAX_SECONDS, 'seconds', `must be greater than 0 and at most ${MAX_SECONDS}, got ${spec.seconds}`);
  need(Math.round(spec.seconds * fs) >= 1, 'seconds', 'is shorter than one sample');
  if (spec.kind === 'silence') return;
  need(Number.isFinite(spec.levelDbfs), 'levelDbfs', `must be a number, got ${spec.levelDbfs}`);
  if (spec.levelDbfs > 0) {
    throw new StimulusError(
      'level-above-full-scale',
      `The stimulus's levelDbfs ${spec.levelDbfs} is above 0 dBFS; Earmark refuses levels above full scale (a full-scale sine is 0 dBFS)`,
    );
  }
  const nyquist = fs / 2;
  const inBand = (f: number): boolean => f > 0 && f < nyquist;
  if (spec.kind === 'impulse') {
    need(Number.isInteger(spec.delaySamples) && spec.delaySamples >= 0 && spec.delaySamples < Math.round(spec.seconds * fs), 'delaySamples', 'must fall inside the signal');
    return;
  }
  need(spec.fadeInSeconds >= 0 && spec.fadeOutSeconds >= 0, 'fadeInSeconds/fadeOutSeconds', 'must be 0 or more');
  need(spec.fadeInSeconds + spec.fadeOutSeconds <= spec.seconds, 'fadeInSeconds', 'and fadeOutSeconds together must not be longer than the signal');
  switch (spec.kind) {
    case 'sine':
      need(inBand(spec.frequency), 'frequency', `must lie between 0 and fs/2 = ${nyquist} Hz, got ${spec.frequency}`);
      break;
    case 'multitone': {
      if (spec.frequencies !== undefined) {
        need(spec.frequencies.length >= 1 && spec.frequencies.length <= MAX_TONES, 'frequencies', `must hold 1…${MAX_TONES} tones`);
        need(spec.frequencies.every(inBand), 'frequencies', `must all lie between 0 and fs/2 = ${nyquist} Hz`);
      } else {
        const { from, to, count } = spec;
        need(from !== undefined && to !== undefined && count !== undefined, 'frequencies', 'or from, to and count are required');
        need(Number.isInteger(count) && (count ?? 0) >= 1 && (count ?? 0) <= MAX_TONES, 'count', `must be 1…${MAX_TONES}`);
        need(inBand(from ?? 0) && inBand(to ?? 0), 'from/to', `must lie between 0 and fs/2 = ${nyquist} Hz`);
        need(count === 1 || (from ?? 0) < (to ?? 0), 'from', 'must be below to');
      }
      need(Number.isSafeInteger(spec.seed) && spec.seed >= 0, 'seed', 'must be a whole number ≥ 0');
      break;
    }
    case 'sweep':
      need(inBand(spec.from) && inBand(spec.to), 'from/to', `must lie between 0 and fs/2 = ${nyquist} Hz`);
      need(spec.from < spec.to, 'from', 'must be below to');
      need(Math.round(spec.seconds * fs) >= 2, 'seconds', 'must give the sweep at least 2 samples');
      need(spec.silenceSeconds >= 0 && spec.seconds + spec.silenceSeconds <= MAX_SECONDS, 'silenceSeconds', `must be ≥ 0, with the sweep at most ${MAX_SECONDS} s`);
      break;
    case 'white-noise':
    case 'pink-noise':
      need(Number.isSafeInteger(spec.seed) && spec.seed >= 0, 'seed', 'must be a whole number ≥ 0');
      break;
    case 'imd-smpte':
    case 'imd-twin-tone':
      need(inBand(spec.lowFrequency) && inBand(spec.highFrequency), 'lowFrequency/highFrequency', `must lie between 0 and fs/2 = ${nyquist} Hz`);
      need(spec.lowFrequency < spec.highFrequency, 'lowFrequency', 'must be below highFrequency');
      if (spec.kind === 'imd-smpte') {
        need(Number.isFinite(spec.ratio) && spec.ratio >= 1 / MAX_IMD_RATIO && spec.ratio <= MAX_IMD_RATIO, 'ratio', `must lie in 1/${MAX_IMD_RATIO}…${MAX_IMD_RATIO}, got ${spec.ratio}`);
      }
      break;
  }
}
