import { Option, type Command } from 'commander';
import { MaskEvaluation } from '@earmark/contracts';
import { evaluateMask } from '@earmark/dsp';
import { EXIT, exitWithError, usageExitCode } from '../cli-error.js';
import { loadAnalysisInputs, type InputFlags } from '../analyze/load-inputs.js';
import { summarizeEvaluation } from '../evaluate/evaluation-summary.js';
import { formatEvaluation } from '../evaluate/format-evaluation.js';
import { loadMask } from '../evaluate/load-mask.js';

interface EvaluateFlags extends InputFlags {
  mask: string;
  json?: boolean;
}

const EXIT_BY_VERDICT = { pass: EXIT.ok, fail: EXIT.fail, error: EXIT.error } as const;

async function runEvaluate(capturePath: string, flags: EvaluateFlags): Promise<number> {
  const mask = await loadMask(flags.mask);
  const inputs = await loadAnalysisInputs(capturePath, flags);
  // The same call the worker makes: the parsed mask into the engine, the result checked against the contract.
  const evaluation = MaskEvaluation.parse(
    evaluateMask(inputs, mask),
  );
  const summary = summarizeEvaluation(evaluation);
  process.stdout.write(flags.json ? `${JSON.stringify(summary, null, 2)}\n` : formatEvaluation(summary, capturePath));
  return EXIT_BY_VERDICT[evaluation.verdict];
}

/**
 * `earmark evaluate <capture.wav> --mask <mask.json>`: evaluates a tolerance mask (docs/masks.md)
 * on a capture, optionally against its stimulus, and prints the verdict and each check's
 * measured value, limit and margin. Exit 0 pass, 1 fail, 2 error (a check could not be
 * evaluated), 3 bad input (one line on stderr).
 */
export function registerEvaluateCommand(program: Command): void {
  const command = program
    .command('evaluate')
    .description('evaluate a tolerance mask on a capture: pass (exit 0), fail (1) or error (2); bad input exits 3')
    .argument('<capture.wav>', 'the captured output (WAV: PCM 8/16/24/32-bit or float 32/64)')
    .requiredOption('--mask <mask.json>', 'the mask: { "checks": [...] } (see docs/masks.md)')
    .option('--reference <stimulus.wav>', 'the stimulus as played, for checks on the transfer function, phase and latency')
    .option('--stimulus <spec.json>', 'the stimulus as a spec file (generated exactly as the rig played it)')
    .option('--channel <n>', 'evaluate only this channel (0 = first)')
    .addOption(new Option('--transfer-method <method>', 'transfer estimator (default: deconvolution for sweep specs, else h1)').choices(['h1', 'deconvolution']))
    .option('--json', 'print the verdict and checks as one JSON object');
  command.exitOverride((err) => process.exit(usageExitCode(err.exitCode)));
  command.action(async (capturePath: string, flags: EvaluateFlags, cmd: Command) => {
    const debug = cmd.optsWithGlobals<{ debug?: boolean }>().debug === true;
    let code: number;
    try {
      code = await runEvaluate(capturePath, flags);
    } catch (error) {
      exitWithError(error, debug);
    }
    process.exitCode = code;
  });
}
