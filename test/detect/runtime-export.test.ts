import { readFileSync } from 'node:fs';
import seedrandom from 'seedrandom';
import { describe, expect, it } from 'vitest';
import type { CascadeModel } from '../../src/cascade/cascade-model.js';
import { exportRuntimeCascade, parseRuntimeCascade } from '../../src/cascade/runtime-export.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { scanImage } from '../../src/detect/scan-image.js';
import { enumerateFeatures } from '../../src/features/enumerate-features.js';
import { computeIntegralImage } from '../../src/image/integral-image.js';
import { isRectboostError } from '../../src/errors.js';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { randomGrayImage } from '../helpers/random-image.js';
import { handBuiltCascade } from '../helpers/synthetic-scene.js';

const schema = JSON.parse(readFileSync(new URL('../../schema/runtime-cascade.schema.json', import.meta.url), 'utf8')) as Record<string, unknown>;
// Ajv, a general-purpose JSON Schema (draft 2020-12) validator, checks the export against its schema.
const validateRuntime = new Ajv2020({ allErrors: true, allowUnionTypes: true }).compile(schema);
const checkAgainstSchema = (value: unknown, _schema: unknown): string | null => (validateRuntime(value) ? null : JSON.stringify(validateRuntime.errors));

/** A seeded cascade of every feature kind, with splits near 0 so that many windows pass. */
function seededCascade(): CascadeModel {
  const random = seedrandom('export');
  const features = enumerateFeatures(20, 16);
  return {
    format: 'rectboost-cascade', version: 1, window: { width: 20, height: 16 }, normalization: 'window-standard-deviation', featureSet: 'basic',
    stages: [3, 6].map((size) => ({
      threshold: -0.5,
      weakClassifiers: Array.from({ length: size }, () => ({
        feature: features[Math.floor(random() * features.length)]!,
        splitValue: random() - 0.5,
        belowOutput: -random(),
        aboveOutput: random(),
      })),
    })),
  };
}

describe('runtime-only export', () => {
  it('is valid against schema/runtime-cascade.schema.json and carries no training history', () => {
    const withHistory: CascadeModel = {
      ...handBuiltCascade(),
      meanPositive: new Array<number>(24 * 24).fill(100),
      training: {
        tool: 'test', seed: 1, options: {}, stopReason: 'test',
        data: { positives: 1, validationPositives: 0, backgroundImages: 1, positivesHash: 'x', backgroundsHash: 'y' },
      },
    };
    const file = exportRuntimeCascade(withHistory);
    expect(checkAgainstSchema(JSON.parse(JSON.stringify(file)), schema)).toBeNull();
    expect(Object.keys(file).sort()).toEqual(['format', 'normalization', 'stages', 'version', 'window']);
  });

  it('scans identically to the full model at every scale (same hits, same scores, same counters)', () => {
    const model = seededCascade();
    const exported = parseRuntimeCascade(JSON.stringify(exportRuntimeCascade(model)), 'memory');
    const integral = computeIntegralImage(randomGrayImage(90, 70, 'export-scene'));
    const full = scanImage(detectorCascadeFromModel(model), integral, { scaleStep: 1.2 });
    const runtime = scanImage(exported, integral, { scaleStep: 1.2 });
    expect(full.hits.count).toBeGreaterThan(0);
    expect(full.statistics.scales).toBeGreaterThan(3);
    expect(runtime).toEqual(full);
  });

  it('refuses files that are not JSON, of another version, or with a non-finite split, naming the field', () => {
    const good = exportRuntimeCascade(handBuiltCascade());
    const cases: Array<[string, RegExp]> = [
      ['{ not json', /not valid JSON/],
      [JSON.stringify({ ...good, version: 2 }), /field version must be 1; received 2/],
      [JSON.stringify(good).replace('"split":150', '"split":"150"'), /stages\[0\]\.classifiers\[0\]\.split must be a finite number/],
      [JSON.stringify({ ...good, window: { width: 0, height: 24 } }), /window\.width must be an integer from 1 to 4096/],
    ];
    for (const [text, message] of cases) {
      let caught: unknown;
      try {
        parseRuntimeCascade(text, 'cascade.json');
      } catch (error) {
        caught = error;
      }
      expect(isRectboostError(caught, 'bad-model')).toBe(true);
      expect((caught as Error).message).toMatch(message);
      expect((caught as Error).message).toMatch(/cascade\.json/);
    }
  });
});
