// Engine messages reach people: a refused upload's problem detail, a check's error, a verdict's
// reason. None may start with an internal function name ("decodeWav: …"); each keeps its facts.
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { StimulusSpec } from '@earmark/contracts';
import { describe, expect, it } from 'vitest';
import { AudioDecodeError, EngineInputError, StimulusError, decodeCapture, evaluateMask, generateStimulus, type AudioBuffers, type EvaluateMaskInput } from '../src/index.js';
import { precondition, requireFinite } from '../src/util/preconditions.js';
import { RAW_ERROR_CASES } from './io/raw-error-cases.js';
import { WAV_ERROR_CASES } from './io/wav-error-cases.js';
import { FS, MULTITONE, mask } from './masks/mask-fixtures.js';

/** The shape the brief forbids: a lower-case identifier and a colon at the very start. */
const NAMES_A_FUNCTION = /^[a-z][A-Za-z0-9]*: /;

function thrown(run: () => unknown): Error {
  try {
    run();
  } catch (error) {
    return error as Error;
  }
  throw new Error('expected the call to throw');
}

describe('decoder errors read as sentences for the uploader', () => {
  it.each(WAV_ERROR_CASES)('WAV %s (%s)', (code, _what, bytes, fact) => {
    const error = thrown(() => decodeCapture(bytes, { container: 'wav', sampleRate: 48000, channels: 1 }));
    expect(error).toBeInstanceOf(AudioDecodeError);
    expect((error as AudioDecodeError).code).toBe(code);
    expect(error.message).not.toMatch(NAMES_A_FUNCTION);
    expect(error.message).toMatch(fact);
  });

  it.each(RAW_ERROR_CASES)('raw float32 %s', (code, bytes, opts, fact) => {
    const error = thrown(() => decodeCapture(bytes, { container: 'raw-f32le', ...opts }));
    expect(error).toBeInstanceOf(AudioDecodeError);
    expect((error as AudioDecodeError).code).toBe(code);
    expect(error.message).not.toMatch(NAMES_A_FUNCTION);
    expect(error.message).toMatch(fact);
  });
});

describe('mask evaluation errors name no function', () => {
  const tone = MULTITONE.channels[0] as Float64Array;
  const capture: AudioBuffers = { sampleRate: FS, channels: [tone] };
  const rms = mask({ id: 'rms', kind: 'level', metric: 'rms-dbfs', max: 0 });
  const withNaN = Float64Array.from(tone);
  withNaN[7] = Number.NaN;

  const refusals: Array<[string, EvaluateMaskInput, RegExp]> = [
    ['a sample rate of 0', { capture: { sampleRate: 0, channels: [tone] } }, /^the capture's sample rate must be a finite number > 0 \(got 0\)$/],
    ['no channels', { capture: { sampleRate: FS, channels: [] } }, /^the capture has no channels$/],
    ['one frame', { capture: { sampleRate: FS, channels: [Float64Array.of(0)] } }, /^the capture must hold at least 2 frames \(got 1\)$/],
    ['unequal channels', { capture: { sampleRate: FS, channels: [tone, tone.subarray(1)] } }, /^capture channel 1 holds 47999 frames, channel 0 holds 48000$/],
    ['a NaN in the capture', { capture: { sampleRate: FS, channels: [withNaN] } }, /^sample 7 of capture channel 0 is NaN; only finite samples can be analysed$/],
    ['a stimulus at another rate', { capture, reference: { sampleRate: 44100, channels: [tone] } }, /^the capture is sampled at 48000 Hz but the stimulus is rendered at 44100 Hz$/],
    ['a stimulus of 8 frames', { capture, reference: { sampleRate: FS, channels: [tone.subarray(0, 8)] } }, /^the stimulus must hold at least 16 frames$/],
    ['a NaN in the stimulus', { capture, reference: { sampleRate: FS, channels: [withNaN] } }, /^sample 7 of stimulus channel 0 is NaN; only finite samples can be analysed$/],
    ['a reversed transfer band', { capture, transferBandHz: [2000, 100] }, /^the transfer band must satisfy 0 < low < high \(got 2000…100 Hz\)$/],
    ['an empty channel map', { capture, channels: [] }, /^the channel map must name at least one channel$/],
    ['a channel map beyond the capture', { capture, channels: [0, 2] }, /^the channel map names channel 2 \(counting from 0\) but the capture has 1 channel$/],
  ];

  it.each(refusals)('refuses %s', (_what, input, message) => {
    const error = thrown(() => evaluateMask(input, rms));
    expect(error).toBeInstanceOf(EngineInputError);
    expect((error as EngineInputError).fn).toBe('evaluateMask');
    expect(error.message).not.toMatch(NAMES_A_FUNCTION);
    expect(error.message).toMatch(message);
  });

  it("a check's error and the verdict's reason name no function", () => {
    const result = evaluateMask(
      { capture },
      mask(
        { id: 'response', kind: 'magnitude-envelope', measure: 'transfer', upper: [{ hz: 100, db: 1 }, { hz: 10000, db: 1 }] },
        { id: 'right', kind: 'level', metric: 'rms-dbfs', max: 0, channels: [1] },
        { id: 'late', kind: 'level', metric: 'rms-dbfs', max: 0, timeSeconds: [5, 6] },
      ),
    );
    expect(result.verdict).toBe('error');
    expect(result.checks.map((c) => c.error)).toEqual([
      'this check compares the capture with its stimulus, and no stimulus (reference) was given',
      'channel 1 does not exist (the capture has 1)',
      'the window 5…6 s holds no samples of the 1.000 s capture',
    ]);
    expect(result.reason).toMatch(/^check "response" could not be evaluated: this check compares/);
    for (const text of [result.reason, ...result.checks.map((c) => c.error)]) expect(text).not.toMatch(NAMES_A_FUNCTION);
  });
});

describe('engine preconditions keep the function out of the message', () => {
  it('precondition puts the function in fn and the words in the message', () => {
    const error = thrown(() => precondition(false, 'someEngineFunction', 'frames must be a whole number (got 2.5)'));
    expect(error).toBeInstanceOf(RangeError);
    expect(error).toMatchObject({ name: 'EngineInputError', fn: 'someEngineFunction', message: 'frames must be a whole number (got 2.5)' });
  });

  it('requireFinite names the sample and its value', () => {
    const error = thrown(() => requireFinite(Float64Array.of(0, 1, Number.POSITIVE_INFINITY), 'someEngineFunction', 'the capture'));
    expect(error).toMatchObject({ fn: 'someEngineFunction', message: 'sample 2 of the capture is Infinity; only finite samples can be analysed' });
  });

  it('a stimulus the generator refuses is described by its field', () => {
    const error = thrown(() => generateStimulus({ ...StimulusSpec.parse({ kind: 'sine', sampleRate: 48000, seconds: 1, frequency: 1000 }), frequency: 30000 } as StimulusSpec));
    expect(error).toBeInstanceOf(StimulusError);
    expect(error.message).toBe("The stimulus's frequency must lie between 0 and fs/2 = 24000 Hz, got 30000");
  });

  it('no error constructed in the engine source starts with a function name', () => {
    // A guard for messages no walk above reaches: any literal message passed to an Error
    // constructor (after an optional code argument) or to precondition(), including `${fn}: …`.
    const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../src');
    const offenders: string[] = [];
    const messageStart = /(?:new [A-Za-z]*Error\(\s*(?:'[a-z-]+',\s*)?|precondition\([^,]+,\s*[^,]+,\s*)['`"](\$\{[a-z][A-Za-z0-9]*\}|[a-z][A-Za-z0-9]*): /g;
    const walk = (dir: string): void => {
      for (const entry of fs.readdirSync(dir, { withFileTypes: true })) {
        const file = path.join(dir, entry.name);
        if (entry.isDirectory()) walk(file);
        else if (file.endsWith('.ts')) for (const m of fs.readFileSync(file, 'utf8').matchAll(messageStart)) offenders.push(`${path.relative(root, file)}: ${m[1]}`);
      }
    };
    walk(root);
    expect(offenders).toEqual([]);
  });
});
