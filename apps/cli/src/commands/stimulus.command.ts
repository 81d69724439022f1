import { readFile, writeFile } from 'node:fs/promises';
import { Option, type Command } from 'commander';
import { encodeWav, generateStimulus, sweepInverseFilter } from '@earmark/dsp';
import { STIMULUS_KINDS } from '@earmark/contracts';
import { exitWithError, usageExitCode } from '../cli-error.js';
import { buildStimulusSpec } from '../stimulus/build-stimulus-spec.js';
import { LOUDNESS_CAUTION, describeSignal, peakDbfs } from '../stimulus/describe-stimulus.js';
import type { StimulusFlags } from '../stimulus/stimulus-options.js';
import { BIT_CHOICES } from '../stimulus/wav-layout.js';

async function readSpecFile(path: string): Promise<unknown> {
  let text: string;
  try {
    text = await readFile(path, 'utf8');
  } catch (e) {
    throw new Error(`cannot read spec file ${path}: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`);
  }
  try {
    return JSON.parse(text) as unknown;
  } catch (e) {
    throw new Error(`spec file ${path} is not valid JSON: ${(e as Error).message}`);
  }
}

async function runStimulus(flags: StimulusFlags, command: Command): Promise<void> {
  const layout = BIT_CHOICES[flags.bits];
  if (layout === undefined) throw new Error(`--bits must be one of ${Object.keys(BIT_CHOICES).join(', ')}; got "${flags.bits}"`);
  const fileJson = flags.spec === undefined ? undefined : await readSpecFile(flags.spec);
  if (flags.spec === undefined && flags.kind === undefined) {
    throw new Error(`give --kind (${STIMULUS_KINDS.join(', ')}) or --spec <file.json>`);
  }
  const spec = buildStimulusSpec(fileJson, flags, (flag) => command.getOptionValueSource(flag) === 'cli');
  if (flags.inverse !== undefined && spec.kind !== 'sweep') throw new Error('--inverse applies to sweeps only');
  const { channels, sampleRate } = generateStimulus(spec);
  const bytes = encodeWav(channels, sampleRate, layout.options);
  await writeFile(flags.out, bytes);
  const level = spec.kind === 'silence' ? '' : `, ${spec.levelDbfs} dBFS`;
  process.stderr.write(
    `earmark: wrote ${flags.out}: ${describeSignal(spec)}, ${sampleRate} Hz, ${channels.length} ch, ${layout.label}${level} (peak ${peakDbfs(channels)}), ${channels[0]?.length ?? 0} frames\n`,
  );
  if (flags.inverse !== undefined && spec.kind === 'sweep') {
    const inverse = sweepInverseFilter(spec);
    await writeFile(flags.inverse, encodeWav([inverse], sampleRate, { encoding: 'float', bitsPerSample: 32 }));
    process.stderr.write(`earmark: wrote ${flags.inverse}: inverse filter, ${inverse.length} taps, 32-bit float, unit gain at ${Math.round(Math.sqrt(spec.from * spec.to))} Hz\n`);
  }
  process.stderr.write(`earmark: ${LOUDNESS_CAUTION}\n`);
}

/**
 * `earmark stimulus`: writes a deterministic test signal as WAV, from flags or a JSON spec
 * (docs/stimuli.md). Flags override the spec file's fields. Bad specs exit 3 with one line.
 */
export function registerStimulusCommand(program: Command): void {
  const command = program
    .command('stimulus')
    .description('write a deterministic test signal (sine, multitone, sweep, impulse, noise, silence, IMD two-tone) as a WAV file')
    .requiredOption('-o, --out <file.wav>', 'where to write the WAV file')
    .option('--spec <file.json>', 'read the stimulus spec from a JSON file (flags override its fields)')
    .addOption(new Option('--kind <kind>', 'signal kind').choices([...STIMULUS_KINDS]))
    .option('--rate <hz>', 'sample rate in Hz (default 48000)')
    .option('--seconds <s>', 'duration in seconds (for a sweep: the sweep itself, without --silence)')
    .option('--level <dBFS>', 'level in dBFS, AES17: a full-scale sine is 0 dBFS (default -20; never above 0)')
    .option('--channels <n>', 'number of channels, 1 to 8 (default 1)')
    .option('--frequency <hz>', 'sine frequency')
    .option('--frequencies <list>', 'multitone: comma-separated tone frequencies')
    .option('--from <hz>', 'sweep or multitone: lowest frequency')
    .option('--to <hz>', 'sweep or multitone: highest frequency')
    .option('--count <n>', 'multitone: number of tones between --from and --to')
    .addOption(new Option('--spacing <axis>', 'multitone tone spacing').choices(['log', 'linear']))
    .addOption(new Option('--phases <kind>', 'multitone phases').choices(['schroeder', 'random']))
    .option('--seed <n>', 'seed for noise and random phases (default 0)')
    .option('--fade-in <s>', 'raised-cosine fade-in length in seconds')
    .option('--fade-out <s>', 'raised-cosine fade-out length in seconds')
    .option('--silence <s>', 'sweep: silence after the sweep in seconds')
    .option('--delay <samples>', 'impulse: position of the impulse in samples')
    .option('--independent-channels', 'noise: a separate noise stream on each channel')
    .option('--low <hz>', 'imd-smpte / imd-twin-tone: low tone (defaults 60 Hz / 18 kHz)')
    .option('--high <hz>', 'imd-smpte / imd-twin-tone: high tone (defaults 7 kHz / 19 kHz)')
    .option('--ratio <r>', 'imd-smpte: amplitude ratio low:high (default 4, i.e. 4:1)')
    .option('--bits <depth>', 'WAV sample format: 16, 24, 32, float32 or float64', '24')
    .option('--inverse <file.wav>', "sweep: also write Farina's inverse filter (32-bit float WAV)");
  command.exitOverride((err) => process.exit(usageExitCode(err.exitCode)));
  command.action(async (flags: StimulusFlags, cmd: Command) => {
    const debug = cmd.optsWithGlobals<{ debug?: boolean }>().debug === true;
    try {
      await runStimulus(flags, cmd);
    } catch (error) {
      exitWithError(error, debug);
    }
  });
}
