import { weakClassifierSplits } from '../../src/model/cascade-model.js';
import { readFileSync } from 'node:fs';
import { Ajv2020 } from 'ajv/dist/2020.js';
import { describe, expect, it } from 'vitest';
import type { CascadeModel } from '../../src/cascade/cascade-model.js';
import { parseCascadeModel, serializeCascadeModel } from '../../src/cascade/model-json.js';

// Ajv is a general-purpose JSON Schema validator (draft 2020-12): an outside check that
// the files we write match the schema we publish.
const schema = JSON.parse(readFileSync(new URL('../../schema/cascade-model.schema.json', import.meta.url), 'utf8')) as object;
const validateWithSchema = new Ajv2020({ allErrors: true, allowUnionTypes: true }).compile(schema);

const model: CascadeModel = {
  format: 'rectboost-cascade',
  version: 1,
  window: { width: 6, height: 4 },
  normalization: 'window-standard-deviation',
  featureSet: 'basic',
  meanPositive: Array.from({ length: 24 }, (_, i) => i * 10),
  training: {
    tool: 'rectboost 0.1.0',
    seed: 7,
    options: { booster: 'gentle', stageDetection: 0.995, mirror: false },
    data: { positives: 10, validationPositives: 2, backgroundImages: 3, positivesHash: 'ab', backgroundsHash: 'cd', negativePatches: 4, negativePatchesHash: 'ef' },
    stopReason: 'target false-positive rate reached',
    timing: { createdAt: '2026-12-01T00:00:00.000Z', totalSeconds: 1.5, stageSeconds: [1.5] },
  },
  stages: [
    {
      threshold: -0.125,
      training: { detectionRate: 1, falsePositiveRate: 0.25, positives: 8, negatives: 8, negativesFromPatches: 3, windowsScanned: 5, featuresUsed: 100, stoppedBecause: 'targets-met' },
      weakClassifiers: [
        { feature: { kind: 'two-horizontal', x: 1, y: 0, cellWidth: 2, cellHeight: 4 }, splitValue: 0.1 + 0.2, belowOutput: -0.7, aboveOutput: 0.7 },
        { feature: { kind: 'four-diagonal', x: 0, y: 0, cellWidth: 3, cellHeight: 2 }, splitValue: -1e-7, belowOutput: 0.5, aboveOutput: -0.25 },
      ],
    },
  ],
};

function withChange(edit: (copy: any) => void): string {
  const copy = JSON.parse(serializeCascadeModel(model));
  edit(copy);
  return JSON.stringify(copy);
}

describe('model JSON', () => {
  it('round-trips every number exactly and serializes deterministically', () => {
    const text = serializeCascadeModel(model);
    const parsed = parseCascadeModel(text, 'm.json');
    expect(parsed).toEqual(model);
    expect(serializeCascadeModel(parsed)).toBe(text);
  });

  it('writes files that the published JSON Schema accepts (checked with Ajv)', () => {
    expect(validateWithSchema(JSON.parse(serializeCascadeModel(model))), JSON.stringify(validateWithSchema.errors)).toBe(true);
  });

  const broken: Array<[string, string, RegExp]> = [
    ['a wrong version', withChange((m) => (m.version = 2)), /field version must be 1; received 2/],
    ['a wrong format', withChange((m) => (m.format = 'other')), /field format must be "rectboost-cascade"/],
    ['a non-finite number (1e999 parses to Infinity)', serializeCascadeModel(model).replace('"threshold": -0.125', '"threshold": 1e999'), /stages\[0\]\.threshold must be a finite number/],
    ['a NaN written as a string', withChange((m) => (m.stages[0].weakClassifiers[0].splitValue = 'NaN')), /weakClassifiers\[0\]\.splitValue must be a finite number/],
    ['a feature outside the window', withChange((m) => (m.stages[0].weakClassifiers[1].feature.cellWidth = 4)), /weakClassifiers\[1\]\.feature lies outside the 6×4 window/],
    ['a negative coordinate', withChange((m) => (m.stages[0].weakClassifiers[0].feature.x = -1)), /feature\.x must be an integer from 0/],
    ['an unknown feature kind', withChange((m) => (m.stages[0].weakClassifiers[0].feature.kind = 'tilted')), /feature\.kind must be one of/],
    ['a missing field', withChange((m) => delete m.stages[0].threshold), /stages\[0\]\.threshold is missing/],
    ['a missing window', withChange((m) => delete m.window), /field window is missing/],
    ['an unknown field', withChange((m) => (m.stages[0].bias = 1)), /stages\[0\]\.bias is not a known field/],
    ['a window above the supported side', withChange((m) => (m.window.width = 5000)), /window\.width must be an integer from 1 to 64/],
    ['more negatives from patches than negatives', withChange((m) => (m.stages[0].training.negativesFromPatches = 9)), /training\.negativesFromPatches must be an integer from 0 to 8/],
    ['truncated JSON', serializeCascadeModel(model).slice(0, 200), /is not valid JSON .* it may be truncated/],
  ];
  for (const [name, text, message] of broken) {
    it(`rejects ${name} with a message naming the file and field`, () => {
      expect(() => parseCascadeModel(text, 'broken.json')).toThrow(message);
      expect(() => parseCascadeModel(text, 'broken.json')).toThrow(/^Model broken\.json/);
    });
  }

  it('the schema rejects the same structural faults as the loader', () => {
    for (const edit of [(m: any) => (m.version = 2), (m: any) => delete m.stages[0].threshold, (m: any) => (m.stages[0].weakClassifiers[0].feature.kind = 'tilted')]) {
      expect(validateWithSchema(JSON.parse(withChange(edit)))).toBe(false);
    }
  });

  it('refuses oversized stage lists before walking them', () => {
    const text = withChange((m) => (m.stages = Array.from({ length: 1001 }, () => m.stages[0])));
    expect(() => parseCascadeModel(text, 'big.json')).toThrow(/stages has 1001 entries, above the limit of 1000/);
  });

  describe('feature sets', () => {
    const tilted = { kind: 'tilted-three-horizontal', x: 1, y: 0, cellWidth: 1, cellHeight: 1 };
    const surround = { kind: 'centre-surround', x: 0, y: 0, cellWidth: 2, cellHeight: 1 };

    it('reads an extended model with tilted and centre-surround kinds back to the same model and bytes', () => {
      const text = withChange((m) => {
        m.featureSet = 'extended';
        m.stages[0].weakClassifiers[0].feature = tilted;
        m.stages[0].weakClassifiers[1].feature = surround;
      });
      const parsed = parseCascadeModel(text, 'extended.json');
      expect(parsed.featureSet).toBe('extended');
      expect(parsed.stages[0]!.weakClassifiers.map((weak) => weakClassifierSplits(weak)[0]!.feature.kind)).toEqual(['tilted-three-horizontal', 'centre-surround']);
      expect(parseCascadeModel(serializeCascadeModel(parsed), 'again.json')).toEqual(parsed);
      expect(validateWithSchema(JSON.parse(serializeCascadeModel(parsed)))).toBe(true);
    });

    it('refuses the added kinds in a basic model, in the loader and in the schema alike', () => {
      for (const feature of [tilted, surround]) {
        const text = withChange((m) => (m.stages[0].weakClassifiers[0].feature = feature));
        expect(() => parseCascadeModel(text, 'basic.json')).toThrow(/stages\[0\]\.weakClassifiers\[0\]\.feature\.kind must be one of two-horizontal, .*four-diagonal; received/);
        expect(validateWithSchema(JSON.parse(text))).toBe(false);
      }
    });

    it('refuses a tilted feature whose footprint leaves the window (x − cellHeight < 0)', () => {
      const text = withChange((m) => {
        m.featureSet = 'extended';
        m.stages[0].weakClassifiers[0].feature = { ...tilted, x: 0 };
      });
      expect(() => parseCascadeModel(text, 'outside.json')).toThrow(/feature lies outside the 6×4 window/);
    });

    it('refuses an unknown feature set', () => {
      expect(() => parseCascadeModel(withChange((m) => (m.featureSet = 'tilted')), 'set.json')).toThrow(/featureSet must be one of basic, extended/);
    });
  });
});
