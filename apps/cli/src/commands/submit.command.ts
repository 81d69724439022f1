import type { Command } from 'commander';
import { exitWithError, usageExitCode } from '../cli-error.js';
import { runSubmit } from '../submit/run-submit.js';
import { readSubmitEnv } from '../submit/submit-env.js';
import { DEFAULT_TIMEOUT_SECONDS, planSubmit, type SubmitFlags } from '../submit/submit-options.js';
import { createSubmitProgress } from '../submit/submit-progress.js';

const HELP_AFTER = `
Environment:
  EARMARK_URL    server URL when --server is not given
  EARMARK_TOKEN  API token when --token is not given (keep it in a CI secret)

Formats:
  *.wav                WAV as recorded (PCM 8/16/24/32-bit or float 32/64, 1-8 channels)
  *.f32, *.raw         raw little-endian float32, interleaved; needs --rate and --channels

Exit codes (with --wait, the build-status rule over these captures: an error outranks a failure):
  0  without --wait: every capture was accepted; with --wait: every capture passed
  1  with --wait: at least one capture failed its mask, none is an error (block the build)
  2  with --wait: at least one capture could not be judged (an error verdict); look at it
  3  the run could not finish: bad arguments, unreadable file, network trouble or the
     server unreachable after retries, a problem answer from the server, or --timeout
     passed with verdicts pending (retry, or fix the invocation)

Uploads carry an Idempotency-Key made from the project, SHA, test case, target, format
and the file's SHA-256, so running the same step again never stores a capture twice.
See docs/ci.md.
`;

/**
 * `earmark submit`: the CI client. Creates the build, uploads captures, optionally waits for
 * verdicts and writes the server's JUnit report; the exit code gates the pipeline.
 */
export function registerSubmitCommand(program: Command): void {
  const command = program
    .command('submit')
    .description('upload captures of a firmware build to Earmark and, with --wait, gate on their verdicts')
    .argument('<files...>', 'capture files (*.wav, or raw float32 *.f32 / *.raw)')
    .option('--server <url>', 'Earmark server URL (default: $EARMARK_URL)')
    .option('--token <token>', 'API token of the project (default: $EARMARK_TOKEN)')
    .requiredOption('--project <key>', 'project key, e.g. kestrel-buds')
    .requiredOption('--sha <sha>', 'commit SHA of the firmware build (7 to 64 hex digits)')
    .option('--branch <name>', 'branch the build came from')
    .option('--label <text>', 'a label for the build, e.g. a version')
    .option('--pipeline-url <url>', 'link back to the pipeline run')
    .option('--built-at <time>', 'when the build was made, ISO 8601 with a time zone (default: when Earmark first hears of it)')
    .requiredOption('--case <key>', 'test case the captures belong to, e.g. eq.music.sweep')
    .option('--target <key>', "target (hardware variant); omit when the project has only one")
    .option('--wait', 'wait for the verdicts and exit 0 pass / 1 fail / 2 error (3: could not finish)')
    .option('--timeout <seconds>', `with --wait: how long to wait for all verdicts after the last upload (default ${DEFAULT_TIMEOUT_SECONDS})`)
    .option('--junit <report.xml>', "with --wait: write the build's JUnit XML report here")
    .option('--rate <hz>', 'sample rate of raw float32 captures')
    .option('--channels <n>', 'channel count of raw float32 captures')
    .option('--json', 'print one JSON object (build and captures) instead of the summary')
    .addHelpText('after', HELP_AFTER);
  command.exitOverride((err) => process.exit(usageExitCode(err.exitCode)));
  command.action(async (files: string[], flags: SubmitFlags, cmd: Command) => {
    const debug = cmd.optsWithGlobals<{ debug?: boolean }>().debug === true;
    try {
      const plan = await planSubmit(flags, files, readSubmitEnv());
      // Set, not exit: lets stdout drain when it is a pipe to another step.
      process.exitCode = await runSubmit(plan, { stdout: process.stdout, progress: createSubmitProgress(process.stderr) });
    } catch (error) {
      exitWithError(error, debug);
    }
  });
}
