import { existsSync, mkdtempSync, readFileSync, readdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseCascadeModel } from '../../src/cascade/model-json.js';
import { runCli } from '../helpers/run-cli.js';

describe('rectboost demo at reduced size', () => {
  it('trains at least two stages, writes every output, and finds most rivets on panel p01', () => {
    const out = mkdtempSync(join(tmpdir(), 'rectboost-demo-'));
    // Not --quiet, so the file list is printed (progress lines stay off: stderr is not a terminal here).
    const result = runCli(['demo', '--out', out, '--max-stages', '3', '--positives', '300'], { timeoutMs: 300_000 });
    expect(result.stderr).toBe('');
    expect(result.status).toBe(0);
    const model = parseCascadeModel(readFileSync(join(out, 'rivets.json'), 'utf8'), 'rivets.json');
    expect(model.stages.length).toBeGreaterThanOrEqual(2);
    expect(readFileSync(join(out, 'detections.jsonl'), 'utf8').trim().split('\n')).toHaveLength(8);
    expect(readdirSync(join(out, 'scenes')).filter((f) => f.endsWith('.png'))).toHaveLength(8);
    const report = JSON.parse(readFileSync(join(out, 'report.json'), 'utf8')) as { scenes: Array<{ image: string; rivets: number; found: number }> };
    const panel = report.scenes.find((scene) => scene.image === 'p01.png')!;
    // Measured with these settings (seed 1): 12 of 12 rivets on p01 at IoU ≥ 0.5; floor 9 of 12 leaves margin.
    expect(panel.rivets).toBe(12);
    expect(panel.found).toBeGreaterThanOrEqual(9);
    expect(existsSync(join(out, 'report.json'))).toBe(true);
    // The visual report and its PNG plots: three model charts (the model has training records) and three detection charts.
    const page = readFileSync(join(out, 'report.html'), 'utf8');
    expect(page).toContain('Cases to act on');
    expect(readdirSync(join(out, 'plots')).sort()).toEqual([
      'false-positive-rates.png', 'mining-effort.png', 'miss-rate.png', 'precision-recall.png', 'rejected-by-stage.png', 'weak-classifiers.png',
    ]);
    expect(result.stdout).toContain(`${join(out, 'report.html')}  (the visual report`);
  });
});
