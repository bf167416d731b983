import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { writeBadImages } from '../helpers/bad-images.js';
import { runCli } from '../helpers/run-cli.js';

describe('rectboost CLI basics', () => {
  const folder = mkdtempSync(join(tmpdir(), 'rectboost-cli-'));
  let bad: Awaited<ReturnType<typeof writeBadImages>>;
  beforeAll(async () => {
    bad = await writeBadImages(folder);
  });

  it('--help lists every command planned in the design', () => {
    const { status, stdout } = runCli(['--help']);
    expect(status).toBe(0);
    for (const command of ['train', 'detect', 'evaluate', 'tune', 'export', 'inspect', 'demo', 'check']) {
      expect(stdout).toMatch(new RegExp(`\\n  ${command}\\b`));
    }
  });

  const cases: Array<[string, () => string, RegExp]> = [
    ['a truncated PNG', () => bad.truncated, /truncated\.png/],
    ['a text file named .png', () => bad.text, /notes\.png is not a readable/],
    ['a zero-byte file', () => bad.empty, /empty\.png is an empty file/],
    ['an image above the pixel limit', () => bad.large, /large\.png is 100×100 = 10000 pixels, above the limit/],
  ];
  for (const [name, path, message] of cases) {
    it(`check reports ${name} in one line naming the file, with no stack trace, exit 1`, () => {
      const { status, stderr } = runCli(['check', path(), '--max-pixels', '9999']);
      expect(status).toBe(1);
      const lines = stderr.trim().split('\n');
      expect(lines.at(-1)).toMatch(message);
      expect(stderr).not.toMatch(/\n\s+at /);
    });
  }

  it('check exits 2 with one sentence for a bad option value', () => {
    const { status, stderr } = runCli(['check', bad.good, '--max-pixels', 'many']);
    expect(status).toBe(2);
    expect(stderr.trim()).toBe('rectboost: --max-pixels must be a whole number from 1 to 67108864; received "many".');
  });

  it('check accepts a good image and exits 0', () => {
    const { status, stdout } = runCli(['check', bad.good]);
    expect(status).toBe(0);
    expect(stdout).toMatch(/1 of 1 images readable/);
  });
});
