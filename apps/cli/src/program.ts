import { Command } from 'commander';
import { usageExitCode } from './cli-error.js';
import { registerAnalyzeCommand } from './commands/analyze.command.js';
import { registerEvaluateCommand } from './commands/evaluate.command.js';
import { registerStimulusCommand } from './commands/stimulus.command.js';
import { registerSubmitCommand } from './commands/submit.command.js';

/** The `earmark` command line: engine commands now, CI commands as they land. */
export function buildProgram(): Command {
  const program = new Command('earmark')
    .description('Earmark: acceptance tests for audio DSP firmware builds')
    .option('--debug', 'print stack traces on errors')
    .showHelpAfterError()
    // An unknown command or no command is a usage error (3), never commander's 1, which reads as "fail".
    .exitOverride((err) => process.exit(usageExitCode(err.exitCode)));
  registerAnalyzeCommand(program);
  registerEvaluateCommand(program);
  registerStimulusCommand(program);
  registerSubmitCommand(program);
  return program;
}
