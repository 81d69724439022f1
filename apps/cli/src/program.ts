import { Command } from 'commander';
import { registerAnalyzeCommand } from './commands/analyze.command.js';
import { registerEvaluateCommand } from './commands/evaluate.command.js';
import { registerStimulusCommand } from './commands/stimulus.command.js';
import { registerSubmitCommand } from './commands/submit.command.js';

/** The `earmark` command line: engine commands now, CI commands as they land. */
export function buildProgram(): Command {
  const program = new Command('earmark')
    .description('Earmark: acceptance tests for audio DSP firmware builds')
    .option('--debug', 'print stack traces on errors')
    .showHelpAfterError();
  registerAnalyzeCommand(program);
  registerEvaluateCommand(program);
  registerStimulusCommand(program);
  registerSubmitCommand(program);
  return program;
}
