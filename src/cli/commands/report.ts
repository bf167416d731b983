import { basename } from 'node:path';
import type { Command } from 'commander';
import { loadModelFile } from '../../io/model-file.js';
import { assembleReportContent, writeReportFiles, type ReportInputs } from '../../io/report-files.js';
import { addEvaluationOptions, runEvaluation, type EvaluationFlags } from './evaluate.js';

/** The report outputs as option text: the page and the folder of PNG plots. */
export interface ReportFlags {
  report?: string;
  plots?: string;
}

/** Adds `FLAG <file>` (the HTML page) and `--plots <folder>` to a command. */
export function addReportOptions(command: Command, flag: '--report' | '--out'): Command {
  return command
    .option(`${flag} <file>`, 'write the visual report: one self-contained HTML page that opens offline')
    .option('--plots <folder>', 'write the report\u2019s charts as PNG files into this folder');
}

/**
 * Writes the page and plots the flags ask for (nothing without them) and names
 * the files on stderr; returns the files written.
 */
export async function writeReportFromInputs(flags: ReportFlags, inputs: Omit<ReportInputs, 'title'>): Promise<string[]> {
  if (flags.report === undefined && flags.plots === undefined) return [];
  const content = await assembleReportContent({ title: `Cascade report: ${basename(inputs.modelPath)}`, ...inputs });
  const written = await writeReportFiles(content, flags.report, flags.plots);
  if (flags.report !== undefined) process.stderr.write(`Report written to ${flags.report}\n`);
  if (flags.plots !== undefined) process.stderr.write(`Plots written to ${flags.plots}/ (${written.length - (flags.report === undefined ? 0 : 1)} PNG files)\n`);
  return written;
}

/** `rectboost report MODEL --out report.html [--truth FILE | --positives DIR --negatives DIR] [--plots DIR]` */
export function registerReportCommand(program: Command): void {
  const command = program
    .command('report')
    .description('write a visual report of a model (and of its evaluation when given inputs): an offline HTML page and PNG plots')
    .argument('<model>', 'model JSON from rectboost train, or a runtime export');
  addReportOptions(addEvaluationOptions(command), '--out')
    .addHelpText('after', '\nExamples:\n  rectboost report model.json --out model.html\n  rectboost report model.json --truth scenes/truth.jsonl --out report.html --plots plots\n  rectboost report model.json --positives patches/rivets --negatives patches/panels --out patches.html\n')
    .action(async (modelPath: string, options: EvaluationFlags & { out?: string; plots?: string }) => {
      const loaded = await loadModelFile(modelPath, { require: 'any-cascade' });
      const run = await runEvaluation('report', modelPath, loaded.detector, options, false);
      const flags: ReportFlags = { report: options.out ?? 'report.html', ...(options.plots === undefined ? {} : { plots: options.plots }) };
      await writeReportFromInputs(flags, { modelPath, ...loaded, writtenBy: `rectboost report, ${new Date().toISOString()}`, ...(run?.reportParts ?? {}) });
    });
}
