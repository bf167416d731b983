import { describe, expect, it } from 'vitest';
import type { CascadeModel } from '../src/cascade/cascade-model.js';
import { parseCascadeModel, serializeCascadeModel } from '../src/cascade/model-json.js';
import { checkInteger, checkOneOf, FieldChecks } from '../src/check.js';
import { isRectboostError } from '../src/errors.js';
import { errorOf } from './helpers/error-of.js';

/** A valid model of five stages with eight weak classifiers each, all alike. */
function fiveStageModel(): CascadeModel {
  const weak = { feature: { kind: 'two-horizontal' as const, x: 0, y: 0, cellWidth: 2, cellHeight: 4 }, splitValue: 0.5, belowOutput: -1, aboveOutput: 1 };
  return {
    format: 'rectboost-cascade', version: 1, window: { width: 6, height: 4 }, normalization: 'window-standard-deviation', featureSet: 'basic',
    stages: Array.from({ length: 5 }, () => ({ threshold: 0, weakClassifiers: Array.from({ length: 8 }, () => ({ ...weak })) })),
  };
}

/** The model text with one edit applied to its parsed JSON. */
function edited(edit: (copy: any) => void): string {
  const copy = JSON.parse(serializeCascadeModel(fiveStageModel()));
  edit(copy);
  return JSON.stringify(copy);
}

describe('one validation module: field paths, one message shape, one error factory', () => {
  it('names the file, the full field path, what was expected, what was received and what to do', () => {
    const error = errorOf(() => parseCascadeModel(edited((m) => (m.stages[3].weakClassifiers[7].splitValue = 'NaN')), 'm.json'));
    expect(isRectboostError(error, 'bad-model')).toBe(true);
    expect((error as Error).message).toBe(
      'Model m.json: field stages[3].weakClassifiers[7].splitValue must be a finite number from -1000000000000 to 1000000000000; ' +
        'received "NaN". Pass a model written by rectboost train or tune, unedited.',
    );
  });

  it('names nested paths down to the feature field', () => {
    const error = errorOf(() => parseCascadeModel(edited((m) => (m.stages[4].weakClassifiers[2].feature.cellHeight = 0)), 'm.json'));
    expect((error as Error).message).toMatch(/^Model m\.json: field stages\[4\]\.weakClassifiers\[2\]\.feature\.cellHeight must be an integer from 1 to 64; received 0\./);
  });

  it('words a missing field and an unknown field by path', () => {
    expect((errorOf(() => parseCascadeModel(edited((m) => delete m.stages[2].weakClassifiers[5].aboveOutput), 'm.json')) as Error).message)
      .toMatch(/^Model m\.json: field stages\[2\]\.weakClassifiers\[5\]\.aboveOutput is missing\./);
    expect((errorOf(() => parseCascadeModel(edited((m) => (m.stages[1].weakClassifiers[0].feature.angle = 45)), 'm.json')) as Error).message)
      .toMatch(/^Model m\.json: field stages\[1\]\.weakClassifiers\[0\]\.feature\.angle is not a known field\./);
  });

  it('calls the root "the top level"', () => {
    expect((errorOf(() => parseCascadeModel('[1, 2]', 'm.json')) as Error).message).toMatch(/^Model m\.json: the top level must be an object; received \[1,2\]\./);
  });

  it('words option checks the same way, by option name, as invalid-option', () => {
    const error = errorOf(() => checkInteger('rounds', 0, 1, 100_000));
    expect(isRectboostError(error, 'invalid-option')).toBe(true);
    expect((error as Error).message).toBe('rounds must be an integer from 1 to 100000; received 0.');
    expect((errorOf(() => checkOneOf('booster', 'real', ['discrete', 'gentle'])) as Error).message).toBe('booster must be one of discrete, gentle; received "real".');
  });

  it('shows long received values cut to 60 characters', () => {
    const checks = new FieldChecks({ code: 'bad-data', source: 'File f' });
    const message = (errorOf(() => checks.finite({ text: 'x'.repeat(100) }, 'a.b')) as Error).message;
    expect(message).toMatch(/^File f: field a\.b must be a finite number; received \{"text":"x+\.\.\.\.$/);
    // 57 characters of JSON and "...".
    expect(message.slice(message.indexOf('received ') + 9, -1)).toHaveLength(60);
  });

  it('returns checked values unchanged', () => {
    const checks = new FieldChecks({ code: 'bad-model', source: 'Model m' });
    expect(checks.integer(7, 'n', 0, 10)).toBe(7);
    expect(checks.oneOf('gentle', 'booster', ['discrete', 'gentle'])).toBe('gentle');
    expect(checks.constant(1, 'version', 1)).toBe(1);
  });
});
