// trainModel, the one library call behind `rectboost train` and `rectboost demo`: an interrupted
// run leaves its finished stages as a usable model and a checkpoint, wherever it is stopped,
// and resuming gives the same bytes as a run that was never stopped.
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseCascadeModel } from '../../src/cascade/model-json.js';
import { trainModel, type TrainModelEvent, type TrainModelOptions } from '../../src/io/train-model.js';
import { writeSyntheticTrainingData } from '../helpers/synthetic-data.js';

const root = mkdtempSync(join(tmpdir(), 'rectboost-train-model-'));
let base: Omit<TrainModelOptions, 'out'>;
let uninterrupted = '';

beforeAll(async () => {
  const data = await writeSyntheticTrainingData(root, { positives: 200, backgrounds: 6, size: 12, backgroundWidth: 120, backgroundHeight: 90, seed: 'train-model' });
  base = {
    positives: data.positives,
    backgrounds: data.backgrounds,
    windowWidth: 12,
    windowHeight: 12,
    stageDetectionRate: 0.98,
    stageFalsePositiveRate: 0.5,
    targetFalsePositiveRate: 1e-6,
    maxStages: 3,
    maxWeakClassifiers: 20,
    negativesPerStage: 200,
    booster: 'gentle',
    mirror: false,
    validationShare: 0.2,
    seed: 5,
    memoryBytes: 2 ** 30,
    workers: 1,
    recordTiming: false,
  };
  const out = join(root, 'whole.json');
  const whole = await trainModel({ ...base, out });
  expect(whole.result.stopReason).toBe('max-stages');
  uninterrupted = readFileSync(out, 'utf8');
});

/** Trains until `when` first holds for an event, then aborts, as Ctrl-C does. */
async function trainAndAbort(out: string, when: (event: TrainModelEvent) => boolean): ReturnType<typeof trainModel> {
  const controller = new AbortController();
  return trainModel({
    ...base,
    out,
    signal: controller.signal,
    onEvent: (event) => {
      if (!controller.signal.aborted && when(event)) controller.abort();
    },
  });
}

describe('an interrupted training run', () => {
  // Points of the second stage's work (stageIndex 1): each is a different place in the code
  // where the stop request is noticed (mining's chunk loop, before the response table, a boosting round).
  const points: Array<[string, (event: TrainModelEvent) => boolean]> = [
    ['while mining negatives', (event) => event.phase === 'mining' && event.stageIndex === 1],
    ['before computing feature responses', (event) => event.phase === 'responses' && event.stageIndex === 1],
    ['between boosting rounds', (event) => event.phase === 'boosting' && event.stageIndex === 1],
  ];
  for (const [name, when] of points) {
    it(`stopped ${name} writes the finished stage as a model and resumes to the same bytes`, async () => {
      const out = join(root, `${name.replace(/\W+/g, '-')}.json`);
      const stopped = await trainAndAbort(out, when);
      expect(stopped.result.stopReason).toBe('interrupted');
      expect(stopped.written).toBe(true);
      const model = parseCascadeModel(readFileSync(out, 'utf8'), out);
      // Stage 1 had finished; stage 2 was in progress and is dropped.
      expect(model.stages.length).toBe(1);
      expect(model.training!.stopReason).toBe('interrupted');
      expect(model.meanPositive?.length).toBe(144);
      expect(existsSync(join(stopped.checkpointDirectory, 'progress.json'))).toBe(true);

      const resumed = await trainModel({ ...base, out, resume: true });
      expect(resumed.result.stopReason).toBe('max-stages');
      expect(readFileSync(out, 'utf8')).toBe(uninterrupted);
      expect(existsSync(stopped.checkpointDirectory)).toBe(false);
    });
  }

  it('stopped before its first stage finished writes no model, and --resume starts afresh to the same bytes', async () => {
    const out = join(root, 'first-stage.json');
    const stopped = await trainAndAbort(out, (event) => event.phase === 'boosting' && event.stageIndex === 0);
    expect(stopped.result.stopReason).toBe('interrupted');
    expect(stopped.result.stages).toEqual([]);
    expect(stopped.written).toBe(false);
    expect(existsSync(out)).toBe(false);
    const events: TrainModelEvent[] = [];
    await trainModel({ ...base, out, resume: true, onEvent: (event) => events.push(event) });
    expect(events.some((event) => event.phase === 'no-checkpoint')).toBe(true);
    expect(readFileSync(out, 'utf8')).toBe(uninterrupted);
  });
});

describe('trainModel', () => {
  it('warns before training when the detection target means keeping every validation positive', async () => {
    // 200 positives, 20% held out: 40 validation positives; ⌈0.98 · 40⌉ = 40 (all of them),
    // while ⌈0.95 · 40⌉ = 38 leaves room for two misses.
    const warnings = async (stageDetectionRate: number): Promise<string[]> => {
      const found: string[] = [];
      const out = join(root, `warn-${stageDetectionRate}.json`);
      await trainModel({ ...base, out, stageDetectionRate, maxStages: 1, onEvent: (event) => event.phase === 'warning' && found.push(event.message) });
      rmSync(out);
      return found;
    };
    expect(await warnings(0.98)).toEqual([expect.stringMatching(/^Only 40 validation positives: a stage detection rate of 0\.98 means keeping every one of them.*at least 50 validation positives/)]);
    expect(await warnings(0.95)).toEqual([]);
  });
});
