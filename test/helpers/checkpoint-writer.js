// Test helper for test/cli/train-kill.test.ts: rewrites a checkpoint in DIR (argv[2]) again
// and again with a growing number of stages, until it is killed. Uses the built library (dist/).
import { writeCheckpoint } from '../../dist/io/checkpoint.js';
import { newCascadeModel } from '../../dist/cascade/cascade-model.js';

const directory = process.argv[2];
const weak = (i) => ({ feature: { kind: 'two-horizontal', x: i % 10, y: 0, cellWidth: 1, cellHeight: 2 }, splitValue: i / 7, belowOutput: -1, aboveOutput: 1 });
const stage = (k) => ({ threshold: -k, weakClassifiers: Array.from({ length: 400 }, (_, i) => weak(i + k)) });
for (let count = 1; ; count++) {
  const stages = Array.from({ length: 1 + (count % 20) }, (_, k) => stage(k));
  await writeCheckpoint(directory, { model: newCascadeModel({ width: 12, height: 12 }, stages), fingerprint: { seed: count }, stageSeconds: stages.map(() => 1) });
}
