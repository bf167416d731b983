import type { Command } from 'commander';
import { joinShards } from '../../parallel/join-shards.js';

/** `rectboost join SHARD_FOLDER --out FILE` */
export function registerJoinCommand(program: Command): void {
  program
    .command('join')
    .description('join the finished shards of detect --list --shard-dir into one detections file, in list order')
    .argument('<folder>', 'the --shard-dir folder of the shards (shard-K-of-N.jsonl with their .done.json markers)')
    .requiredOption('--out <file>', 'where to write the joined detections JSON Lines')
    .option('--quiet', 'no summary line on stderr')
    .addHelpText(
      'after',
      '\nEvery shard must have finished (missing or unfinished ones are named); the result is the same file,\nbyte for byte, that one detect --list run over the whole list writes with the same options.\n\nExamples:\n  rectboost join parts/ --out detections.jsonl\n',
    )
    .action(async (folder: string, options: { out: string; quiet?: boolean }) => {
      const summary = await joinShards(folder, options.out);
      if (options.quiet !== true) {
        const failed = summary.failed > 0 ? ` (${summary.failed} unreadable images were skipped by the shards)` : '';
        process.stderr.write(`join: ${summary.lines} lines from ${summary.shardCount} shards written to ${options.out}${failed}.\n`);
      }
    });
}
