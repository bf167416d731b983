import { mkdtempSync, rmSync, truncateSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { MODEL_LIMITS, serializeCascadeModel } from '../../src/cascade/model-json.js';
import { exportRuntimeCascade } from '../../src/cascade/runtime-export.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { loadModelFile } from '../../src/io/model-file.js';
import { handBuiltCascade } from '../helpers/synthetic-scene.js';

describe('loadModelFile: one loader, the requirement explicit', () => {
  const folder = mkdtempSync(join(tmpdir(), 'rectboost-model-file-'));
  afterAll(() => rmSync(folder, { recursive: true, force: true }));
  const model = handBuiltCascade();
  const fullPath = join(folder, 'full.json');
  const runtimePath = join(folder, 'runtime.json');
  writeFileSync(fullPath, serializeCascadeModel(model));
  writeFileSync(runtimePath, JSON.stringify(exportRuntimeCascade(model)));

  it('gives the model and its detector for a full model, whatever the requirement', async () => {
    for (const require of ['full-model', 'any-cascade'] as const) {
      const loaded = await loadModelFile(fullPath, { require });
      expect(loaded.kind).toBe('full-model');
      if (loaded.kind !== 'full-model') continue;
      expect(loaded.model).toEqual(model);
      expect(loaded.detector).toEqual(detectorCascadeFromModel(model));
    }
  });

  it('gives a runtime export as a detector only, equal to the full model’s', async () => {
    const loaded = await loadModelFile(runtimePath, { require: 'any-cascade' });
    expect(loaded.kind).toBe('runtime-cascade');
    expect('model' in loaded).toBe(false);
    expect(loaded.detector).toEqual(detectorCascadeFromModel(model));
  });

  it('refuses a runtime export where the full model is required, naming who needs it', async () => {
    await expect(loadModelFile(runtimePath, { require: 'full-model', neededBy: 'rectboost tune' })).rejects.toThrow(
      /runtime\.json is a runtime-only export .*; rectboost tune needs the full model written by rectboost train or tune/,
    );
  });

  it('names the file and the field of invalid content, in both formats', async () => {
    const brokenFull = join(folder, 'broken-full.json');
    writeFileSync(brokenFull, serializeCascadeModel(model).replace(/"threshold": [^,]+,/, '"threshold": "x",'));
    await expect(loadModelFile(brokenFull, { require: 'any-cascade' })).rejects.toThrow(/^Model .*broken-full\.json: field stages\[0\]\.threshold must be a finite number/);
    const brokenRuntime = join(folder, 'broken-runtime.json');
    const file = JSON.parse(JSON.stringify(exportRuntimeCascade(model)));
    file.stages[1].classifiers[0].rectangles[0][2] = 0;
    writeFileSync(brokenRuntime, JSON.stringify(file));
    await expect(loadModelFile(brokenRuntime, { require: 'any-cascade' })).rejects.toThrow(
      /^Cascade file .*broken-runtime\.json: field stages\[1\]\.classifiers\[0\]\.rectangles\[0\]\[2\] \(width, inside the window\) must be an integer from 1/,
    );
  });

  it('refuses a missing file, text that is not JSON, and a file above the size limit before reading it', async () => {
    await expect(loadModelFile(join(folder, 'nope.json'), { require: 'any-cascade' })).rejects.toThrow(/nope\.json does not exist; check the path/);
    const truncated = join(folder, 'truncated.json');
    writeFileSync(truncated, serializeCascadeModel(model).slice(0, 100));
    await expect(loadModelFile(truncated, { require: 'full-model' })).rejects.toThrow(/truncated\.json is not valid JSON/);
    // A sparse file: its size is one byte above the limit, but no disk is used.
    const huge = join(folder, 'huge.json');
    writeFileSync(huge, '');
    truncateSync(huge, MODEL_LIMITS.maxTextBytes + 1);
    await expect(loadModelFile(huge, { require: 'any-cascade' })).rejects.toThrow(new RegExp(`${MODEL_LIMITS.maxTextBytes + 1} bytes, above the limit`));
  });
});
