import { Option, type Command } from 'commander';
import { AnalysisReport } from '@earmark/contracts';
import { analyzeCapture, type AudioBuffers } from '@earmark/dsp';
import { EXIT, exitWithError } from '../cli-error.js';
import { formatReport } from '../analyze/format-report.js';
import { loadStimulusSpec, loadWav } from '../analyze/load-inputs.js';

interface AnalyzeFlags {
  reference?: string;
  stimulus?: string;
  channel?: string;
  json?: boolean;
  transferMethod?: 'h1' | 'deconvolution';
}

async function runAnalyze(capturePath: string, flags: AnalyzeFlags): Promise<void> {
  if (flags.reference !== undefined && flags.stimulus !== undefined) throw new Error('give either --reference or --stimulus, not both');
  const capture = await loadWav(capturePath, 'capture');
  let reference: AudioBuffers | undefined;
  let method = flags.transferMethod;
  if (flags.reference !== undefined) reference = await loadWav(flags.reference, 'reference');
  if (flags.stimulus !== undefined) {
    const spec = await loadStimulusSpec(flags.stimulus);
    reference = spec;
    // A sweep is deterministic and covers its band once: deconvolve it rather than average.
    method ??= spec.kind === 'sweep' ? 'deconvolution' : 'h1';
  }
  if (reference && reference.sampleRate !== capture.sampleRate) {
    throw new Error(`the reference runs at ${reference.sampleRate} Hz but the capture at ${capture.sampleRate} Hz; resample one of them`);
  }
  let channels: number[] | undefined;
  if (flags.channel !== undefined) {
    const c = Number(flags.channel);
    if (!Number.isInteger(c) || c < 0 || c >= capture.channels.length) {
      throw new Error(`--channel must be a channel index 0…${capture.channels.length - 1} (channels count from 0); got "${flags.channel}"`);
    }
    channels = [c];
  }
  const report = AnalysisReport.parse(
    analyzeCapture(capture, {
      ...(reference ? { reference } : {}),
      ...(method ? { transferMethod: method } : {}),
      ...(channels ? { channels } : {}),
    }),
  );
  process.stdout.write(flags.json ? `${JSON.stringify(report, null, 2)}\n` : formatReport(report, capturePath));
}

/**
 * `earmark analyze <capture.wav>`: runs the analysis engine on a capture, optionally against
 * its stimulus (a WAV file or a stimulus spec), and prints the report (docs/analysis.md).
 * Unreadable input exits 2 with one line on stderr.
 */
export function registerAnalyzeCommand(program: Command): void {
  const command = program
    .command('analyze')
    .description('analyse a capture: levels, distortion and noise, 1/3-octave bands and, with a stimulus, the transfer function')
    .argument('<capture.wav>', 'the captured output (WAV: PCM 8/16/24/32-bit or float 32/64)')
    .option('--reference <stimulus.wav>', 'the stimulus as played, for latency, group delay, phase and |H|')
    .option('--stimulus <spec.json>', 'the stimulus as a spec file (generated exactly as the rig played it)')
    .option('--channel <n>', 'analyse only this channel (0 = first)')
    .addOption(new Option('--transfer-method <method>', 'transfer estimator (default: deconvolution for sweep specs, else h1)').choices(['h1', 'deconvolution']))
    .option('--json', 'print the report as one JSON object');
  command.exitOverride((err) => {
    // Usage errors are errors in Earmark's exit-code scheme: 2.
    process.exit(err.exitCode === 0 ? EXIT.ok : EXIT.error);
  });
  command.action(async (capturePath: string, flags: AnalyzeFlags, cmd: Command) => {
    const debug = cmd.optsWithGlobals<{ debug?: boolean }>().debug === true;
    try {
      await runAnalyze(capturePath, flags);
    } catch (error) {
      exitWithError(error, debug);
    }
  });
}
