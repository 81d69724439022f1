import { benchCommand } from './commands/bench.command.js';
import { buildCommand } from './commands/build.command.js';
import { dbCommand } from './commands/db.command.js';
import { reliabilityCommand } from './commands/reliability.command.js';
import { startCommand } from './commands/start.command.js';
import { testCommand } from './commands/test.command.js';

// argv: node infra <command> [...args] (set by infra/bootstrap.mjs)
const [command, ...args] = process.argv.slice(2);
const commands: Record<string, (args: string[]) => Promise<number>> = {
  bench: benchCommand,
  build: () => buildCommand(),
  db: dbCommand,
  reliability: reliabilityCommand,
  start: () => startCommand(),
  test: testCommand,
};

const handler = command ? commands[command] : undefined;
if (!handler) {
  console.error(`unknown infra command: ${command ?? '(none)'}; expected one of ${Object.keys(commands).join(', ')}`);
  process.exit(2);
}
try {
  process.exitCode = await handler(args);
} catch (error) {
  console.error(`earmark: ${error instanceof Error ? error.message : String(error)}`);
  process.exitCode = 1;
}
