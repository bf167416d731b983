import { Command, CommanderError } from 'commander';
import { registerCheckCommand } from './commands/check.js';
import { registerDemoCommand } from './commands/demo.js';
import { registerTrainCommand } from './commands/train.js';
import { registerDetectCommand } from './commands/detect.js';
import { registerEvaluateCommand } from './commands/evaluate.js';
import { registerExportCommand } from './commands/export.js';
import { registerJoinCommand } from './commands/join.js';
import { registerInspectCommand } from './commands/inspect.js';
import { registerTuneCommand } from './commands/tune.js';
import { registerReportCommand } from './commands/report.js';
import { EXIT_USAGE, exitCodeFor, formatError } from './messages.js';

/** Builds the commander program with every command of DESIGN §2 (plus `check`). */
export function buildProgram(): Command {
  const program = new Command();
  program
    .name('rectboost')
    .description('Train and run boosted cascades of Haar-like rectangle features on the CPU.')
    .option('--verbose', 'print stack traces with errors')
    .showHelpAfterError('(run with --help for usage)')
    .exitOverride();
  registerCheckCommand(program);
  registerTrainCommand(program);
  registerDetectCommand(program);
  registerJoinCommand(program);
  registerEvaluateCommand(program);
  registerTuneCommand(program);
  registerExportCommand(program);
  registerInspectCommand(program);
  registerReportCommand(program);
  registerDemoCommand(program);
  return program;
}

/** Entry point of bin/rectboost.js: runs the program and maps errors to exit codes. */
export async function runCli(argv: readonly string[]): Promise<void> {
  const program = buildProgram();
  const verbose = argv.includes('--verbose');
  try {
    await program.parseAsync(argv as string[]);
  } catch (error) {
    if (error instanceof CommanderError) {
      // commander has already printed its message; help and version exit 0.
      process.exitCode = error.exitCode === 0 ? 0 : EXIT_USAGE;
      return;
    }
    process.stderr.write(`${formatError(error, verbose)}\n`);
    process.exitCode = exitCodeFor(error);
  }
}
