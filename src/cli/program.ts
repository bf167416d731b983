import { Command, CommanderError } from 'commander';
import { registerCheckCommand } from './commands/check.js';
import { registerDemoCommand } from './commands/demo.js';
import { registerTrainCommand } from './commands/train.js';
import { registerDetectCommand } from './commands/detect.js';
import { registerEvaluateCommand } from './commands/evaluate.js';
import { registerExportCommand } from './commands/export.js';
import { registerInspectCommand } from './commands/inspect.js';
import { registerTuneCommand } from './commands/tune.js';
import { EXIT_USAGE, exitCodeFor, formatError } from './messages.js';

/** Commands of DESIGN §2 that later work will fill in; until then they say so. */
const PLANNED_COMMANDS: ReadonlyArray<{ name: string; summary: string }> = [
  { name: 'train', summary: 'train a cascade from a folder of positives and a folder of backgrounds' },
  { name: 'detect', summary: 'find objects in images with a trained cascade' },
  { name: 'evaluate', summary: 'measure a cascade on annotated images or labelled patches' },
  { name: 'tune', summary: 'reset stage thresholds for new targets without retraining' },
  { name: 'export', summary: 'write the runtime-only cascade JSON' },
  { name: 'inspect', summary: 'show a per-stage table and draw the first features' },
  { name: 'demo', summary: 'run the whole job on the shipped rivet-inspection data' },
];

/** Builds the commander program; `registered` names commands already built. */
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
  registerEvaluateCommand(program);
  registerTuneCommand(program);
  registerExportCommand(program);
  registerInspectCommand(program);
  registerDemoCommand(program);
  const registered = new Set(program.commands.map((command) => command.name()));
  for (const planned of PLANNED_COMMANDS) {
    if (registered.has(planned.name)) continue;
    program
      .command(planned.name)
      .description(`${planned.summary} (not built yet)`)
      .allowUnknownOption()
      .allowExcessArguments()
      .action(() => {
        process.stderr.write(`rectboost: the ${planned.name} command is not built yet in this version.\n`);
        process.exitCode = 1;
      });
  }
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
