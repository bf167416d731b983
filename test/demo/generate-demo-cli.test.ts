import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const SCRIPT = fileURLToPath(new URL('../../scripts/generate-demo.js', import.meta.url));
const run = (args: string[]) => spawnSync(process.execPath, [SCRIPT, ...args], { encoding: 'utf8', timeout: 60_000 });

describe('scripts/generate-demo.js', () => {
  it('writes the requested counts into --out and says where', () => {
    const out = mkdtempSync(join(tmpdir(), 'rectboost-demo-cli-'));
    try {
      const result = run(['--out', out, '--seed', '3', '--positives', '2', '--backgrounds', '1', '--scenes', '1']);
      expect(result.status).toBe(0);
      // 2 + 1 + 1 PNGs, truth.jsonl and README.md.
      expect(result.stdout).toMatch(new RegExp(`Wrote 6 files .* to ${out}`));
      for (const file of ['positives/rivet-0002.png', 'backgrounds/panel-01.png', 'scenes/p01.png', 'scenes/truth.jsonl', 'README.md']) {
        expect(existsSync(join(out, file))).toBe(true);
      }
      expect(existsSync(join(out, 'positives/rivet-0003.png'))).toBe(false);
    } finally {
      rmSync(out, { recursive: true, force: true });
    }
  });

  it('exits 2 with one sentence on a bad option', () => {
    const unknown = run(['--colour', 'red']);
    expect(unknown.status).toBe(2);
    expect(unknown.stderr).toMatch(/Unknown option "--colour"/);
    const badCount = run(['--positives', '1.5']);
    expect(badCount.status).toBe(2);
    expect(badCount.stderr).toMatch(/--positives must be an integer from 1 to 100000; received "1.5"/);
  });
});
