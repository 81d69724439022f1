import { Option, type Command } from 'commander';
import { AnalysisReport } from '@earmark/contracts';
import { analyzeCapture } from '@earmark/dsp';
import { exitWithError, usageExitCode } from '../cli-error.js';
import { formatReport } from '../analyze/format-report.js';
import { loadAnalysisInputs, type InputFlags } from '../analyze/load-inputs.js';

interface AnalyzeFlags extends InputFlags {
  json?: boolean;
}

async function runAnalyze(capturePath: string, flags: AnalyzeFlags): Promise<void> {
  const { capture, ...options } = await loadAnalysisInputs(capturePath, flags);
  const report = AnalysisReport.parse(
    analyzeCapture(capture, options),
  );
  process.stdout.write(flags.json ? `${JSON.stringify(report, null, 2)}\n` : formatReport(report, capturePath));
}

/**
 * `earmark analyze <capture.wav>`: runs the analysis engine on a capture, optionally against
 * its stimulus (a WAV file or a stimulus spec), and prints the report (docs/analysis.md).
 * Unreadable input exits 3 with one line on stderr.
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
  command.exitOverride((err) => process.exit(usageExitCode(err.exitCode)));
  command.action(async (capturePath: string, flags: AnalyzeFlags, cmd: Command) => {
    const debug = cmd.optsWithGlobals<{ debug?: boolean }>().debug === true;
    try {
      await runAnalyze(capturePath, flags);
    } catch (error) {
      exitWithError(error, debug);
    }
  });
}
