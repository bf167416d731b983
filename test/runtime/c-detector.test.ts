import { weakClassifierSplits } from '../../src/model/cascade-model.js';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { beforeAll, describe, expect, it } from 'vitest';
import { C_SANITIZER_FLAGS, compileC, compilerVersion, exportC, writePgm } from '../../scripts/c-detector/build.js';
import { cWorkBytes, exportCDetector } from '../../src/cascade/c-export.js';
import { detectorCascadeFromModel } from '../../src/detect/detector-cascade.js';
import { decodeGrayImageFile } from '../../src/io/decode-image.js';
import { encodeGrayPng } from '../../src/io/encode-image.js';
import { cropGrayImage } from '../../src/image/gray-image.js';
import { parseCascadeModel, serializeCascadeModel } from '../../src/cascade/model-json.js';
import { randomGrayImage } from '../helpers/random-image.js';
import { randomCascadeModel } from '../helpers/scan-twin.js';
import { REFERENCE_DATA, shouldRunWith } from '../data/reference-files.js';
import { randomTreeCascadeModel } from '../helpers/scan-twin.js';
import { runCli } from '../helpers/run-cli.js';

// The C99 export against the CLI. Needs the system C compiler (Debian gcc, installed by
// .ci/run); outside CI the suite skips with one line when `cc` is missing.
const MODEL = fileURLToPath(new URL('../fixtures/demo-cascade.json', import.meta.url));
const PANELS = fileURLToPath(new URL('../../demo-patches/scenes/', import.meta.url));
const PHOTOS = `${REFERENCE_DATA}photos/`;
const compiler = compilerVersion();
const haveCompiler = compiler !== undefined || Boolean(process.env.CI);
if (!haveCompiler) console.warn('C detector tests skipped: no `cc` on PATH (apt-get install -y gcc).');

interface Line {
  image: string;
  width: number;
  height: number;
  detections: Array<{ box: number[]; score: number; support: number }>;
  windowsScanned: number;
}

let dir = '';
let floatProgram = '';
let integerProgram = '';
// -O2 builds without sanitizers for the long float-versus-integer comparison (the sanitizer
// builds run every other test).
let fastFloatProgram = '';
let fastIntegerProgram = '';
let footprintText = '';

/** Runs a compiled example program; the sanitizers abort on their first report. */
function runC(program: string, args: readonly string[]): { status: number | null; stdout: string; stderr: string } {
  const result = spawnSync(program, args, { encoding: 'utf8', maxBuffer: 1 << 28, env: { ...process.env, ASAN_OPTIONS: 'detect_leaks=1' } });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

/** Decodes images the way the CLI does and writes them as PGM files named after them. */
async function toPgm(folder: string, files: readonly string[]): Promise<string[]> {
  const paths: string[] = [];
  for (const file of files) {
    const path = join(dir, `${file}.pgm`);
    writePgm(path, await decodeGrayImageFile(folder + file));
    paths.push(path);
  }
  return paths;
}

/** The CLI's lines (timing left out), with each image path replaced by its PGM twin's. */
function cliLines(images: readonly string[], pgms: readonly string[], options: readonly string[]): string {
  const out = join(dir, 'cli.jsonl');
  const result = runCli(['detect', MODEL, ...images, '--no-timing', '--quiet', '--workers', '0', '--out', out, ...options]);
  expect(result.stderr).toBe('');
  let text = readFileSync(out, 'utf8');
  images.forEach((image, i) => (text = text.replace(JSON.stringify(image), JSON.stringify(pgms[i]))));
  return text;
}

/** Byte equality, reported as the first differing stretch (the lines run to megabytes). */
function expectSameText(received: string, expected: string): void {
  let at = 0;
  while (at < received.length && received[at] === expected[at]) at++;
  const around = (text: string): string => text.slice(Math.max(0, at - 120), at + 120);
  expect({ at, received: around(received), length: received.length }).toEqual({ at: expected.length === received.length && at === received.length ? at : -1, received: around(expected), length: expected.length });
}

describe('export without a destination', () => {
  it('is a usage error (exit 2) naming --out and --c', () => {
    const result = runCli(['export', MODEL]);
    expect(result.status).toBe(2);
    expect(result.stderr).toMatch(/--out FILE, --c FOLDER/);
  });
});

const panelFiles = readdirSync(PANELS).filter((f) => f.endsWith('.png')).sort();

describe.skipIf(!haveCompiler)(`C99 export compiled with ${compiler ?? 'cc'}`, () => {
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'rectboost-c-'));
    footprintText = exportC(MODEL, dir);
    floatProgram = compileC(dir, 'detect-float', 'float', C_SANITIZER_FLAGS);
    integerProgram = compileC(dir, 'detect-integer', 'integer', C_SANITIZER_FLAGS);
    fastFloatProgram = compileC(dir, 'detect-float-o2', 'float', ['-O2']);
    fastIntegerProgram = compileC(dir, 'detect-integer-o2', 'integer', ['-O2']);
  });

  it('float build prints the same JSON lines as rectboost detect on the eight demo panels (nms, mean, none)', async () => {
    const pgms = await toPgm(PANELS, panelFiles);
    const images = panelFiles.map((f) => PANELS + f);
    for (const options of [[], ['--merge', 'mean', '--overlap', '0.5', '--min-support', '3'], ['--merge', 'none', '--scale-step', '1.1', '--shift', '1.5']]) {
      const c = runC(floatProgram, ['--no-timing', ...options, ...pgms]);
      expect(c.stderr).toBe('');
      expect(c.status).toBe(0);
      expectSameText(c.stdout, cliLines(images, pgms, options));
    }
  });

  it.skipIf(!shouldRunWith('photos/coins.png'))('float build prints the same JSON lines as rectboost detect on scikit-image photos (coins, chelsea)', async () => {
    // scikit-image's sample photos (Debian python3-skimage-lib): a natural gray and a colour photo.
    const files = ['coins.png', 'chelsea.png'];
    const pgms = await toPgm(PHOTOS, files);
    for (const options of [['--smallest', '30'], ['--merge', 'mean', '--largest', '120']]) {
      const c = runC(floatProgram, ['--no-timing', ...options, ...pgms]);
      expect(c.stderr).toBe('');
      expectSameText(c.stdout, cliLines(files.map((f) => PHOTOS + f), pgms, options));
    }
  });

  it('prints milliseconds unless --no-timing, as the CLI does', async () => {
    const [pgm] = await toPgm(PANELS, ['p01.png']);
    const line = JSON.parse(runC(floatProgram, [pgm!]).stdout) as Record<string, unknown>;
    expect(Object.keys(line)).toEqual(['version', 'image', 'width', 'height', 'detections', 'windowsScanned', 'milliseconds']);
  });

  it('prints the footprint that the export reports: tables and work memory agree with rbd_table_bytes and rbd_work_bytes', () => {
    const detector = detectorCascadeFromModel(parseCascadeModel(readFileSync(MODEL, 'utf8'), MODEL));
    const exported = exportCDetector(detector, { header: '', core: '' }, MODEL);
    for (const [program, build] of [[floatProgram, 'float'], [integerProgram, 'integer']] as const) {
      const reported = JSON.parse(runC(program, ['--footprint', '640', '480', '16384']).stdout) as { tableBytes: number; workBytes: number };
      expect(reported.tableBytes).toBe(exported.tableBytes[build]);
      expect(reported.workBytes).toBe(cWorkBytes(detector, build, 640, 480, 16384));
      expect(footprintText).toContain(`${reported.workBytes} bytes (${build} build)`);
    }
  });

  it('a cascade without stages compiles under -Werror and, like detect, accepts every window that is not flat (score 0)', async () => {
    const emptyDir = join(dir, 'empty');
    const cascade = join(dir, 'empty.json');
    writeFileSync(cascade, JSON.stringify({ format: 'rectboost-runtime-cascade', version: 1, window: { width: 12, height: 10 }, normalization: 'window-standard-deviation', stages: [] }));
    exportC(cascade, emptyDir);
    const program = compileC(emptyDir, 'detect-empty', 'float', C_SANITIZER_FLAGS);
    // A 64 × 48 crop of demo panel p01, as PNG for the CLI and as PGM for the C program.
    const crop = cropGrayImage(await decodeGrayImageFile(`${PANELS}p01.png`), 40, 190, 64, 48);
    const source = join(dir, 'crop.png');
    const pgm = join(dir, 'crop.pgm');
    writeFileSync(source, await encodeGrayPng(crop));
    writePgm(pgm, crop);
    const out = join(dir, 'empty.jsonl');
    expect(runCli(['detect', cascade, source, '--no-timing', '--quiet', '--workers', '0', '--out', out]).status).toBe(0);
    const c = runC(program, ['--no-timing', pgm]);
    expect(c.stderr).toBe('');
    expect(c.stdout).toMatch(/"support":\d+/);
    expectSameText(c.stdout, readFileSync(out, 'utf8').replace(JSON.stringify(source), JSON.stringify(pgm)));
  });

  it('a cascade of decision trees (depths 2 and 3, incomplete ones among them) prints the same JSON lines as detect, float build', async () => {
    const treeDir = join(dir, 'trees');
    const model = join(dir, 'trees.json');
    // Thresholds lowered so that windows reach the later stages and some are accepted.
    const random = randomTreeCascadeModel('c-trees', [2, 3, 3], 3);
    writeFileSync(model, serializeCascadeModel({ ...random, stages: random.stages.map((stage) => ({ ...stage, threshold: stage.threshold - 1 })) }));
    exportC(model, treeDir);
    const program = compileC(treeDir, 'detect-trees', 'float', C_SANITIZER_FLAGS);
    const crop = cropGrayImage(await decodeGrayImageFile(`${PANELS}p01.png`), 40, 190, 64, 48);
    const source = join(dir, 'tree-crop.png');
    const pgm = join(dir, 'tree-crop.pgm');
    writeFileSync(source, await encodeGrayPng(crop));
    writePgm(pgm, crop);
    const out = join(dir, 'trees.jsonl');
    expect(runCli(['detect', model, source, '--no-timing', '--quiet', '--workers', '0', '--merge', 'none', '--out', out]).status).toBe(0);
    const c = runC(program, ['--no-timing', '--merge', 'none', pgm]);
    expect(c.stderr).toBe('');
    expect(c.stdout).toMatch(/"score"/);
    expectSameText(c.stdout, readFileSync(out, 'utf8').replace(JSON.stringify(source), JSON.stringify(pgm)));
  });

  describe('integer build', () => {
    it('keeps integral sums exact at its size limit: a white image of 257 × 65,537 pixels (the most whose sum fits 32 bits)', () => {
      // 2^32 − 1 = 255 · 257 · 65,537 (= (2^8 − 1)(2^8 + 1)(2^16 + 1)), so a white 257 × 65,537 image sums to exactly 2^32 − 1.
      // The harness includes the detector source to reach its static integral-image routine.
      const harness = join(dir, 'white-limit.c');
      writeFileSync(
        harness,
        [
          '#include <stdio.h>',
          '#include <stdlib.h>',
          '#include "rectboost_detector.c"',
          'int main(void) {',
          '  int32_t width = 257, height = 65537; size_t stride = (size_t)width + 1u, entries = stride * ((size_t)height + 1u);',
          '  uint8_t *pixels = malloc((size_t)width * (size_t)height); rbd_entry *sum = malloc(entries * sizeof *sum), *squared = malloc(entries * sizeof *squared);',
          '  uint32_t window, squares; if (!pixels || !sum || !squared) return 3;',
          '  memset(pixels, 255, (size_t)width * (size_t)height);',
          '  rbd_integrate(pixels, width, height, width, sum, squared);',
          '  window = squared[257 * stride + 257] - squared[257 * stride] - squared[257] + squared[0];',
          '  squares = squared[(size_t)height * stride + 257] - squared[(size_t)(height - 257) * stride + 257] - squared[(size_t)(height - 257) * stride] + squared[(size_t)height * stride];',
          '  printf("%lu %lu %lu %lu %lu\\n", (unsigned long)sum[entries - 1], (unsigned long)sum[128 * stride + 200], (unsigned long)window, (unsigned long)squares,',
          '         (unsigned long)(rbd_work_bytes(width, height, 1) > 0) + 2ul * (unsigned long)(rbd_work_bytes(width, height + 1, 1) > 0));',
          '  free(pixels); free(sum); free(squared); return 0;',
          '}',
        ].join('\n'),
      );
      const program = join(dir, 'white-limit');
      const built = spawnSync('cc', ['-std=c99', '-Wall', '-Wextra', '-Werror', '-pedantic', ...C_SANITIZER_FLAGS, '-DRBD_INTEGER', `-I${dir}`, harness, '-o', program], { encoding: 'utf8' });
      expect(built.stderr).toBe('');
      const result = runC(program, []);
      expect(result.stderr).toBe('');
      // Whole image: 2^32 − 1. A 200 × 128 corner: 255 · 25,600. A 257 × 257 window's squared sum at the
      // top and at the bottom (where the table entries have wrapped): 255² · 66,049 = 4,294,836,225.
      // The limit itself is accepted (1), one more row is refused (no 2).
      expect(result.stdout.trim()).toBe(`${2 ** 32 - 1} ${255 * 25600} ${255 * 255 * 66049} ${255 * 255 * 66049} 1`);
    });

    it('differs from the float build only at near-ties on the demo panels and the scikit-image photos (bounded as measured)', async () => {
      const sets: Array<[string, string[]]> = [['panels', await toPgm(PANELS, panelFiles)]];
      if (shouldRunWith('photos/coins.png')) {
        sets.push(['photos', await toPgm(PHOTOS, readdirSync(PHOTOS).filter((f) => /\.(png|jpg)$/.test(f)).sort())]);
      }
      for (const [name, pgms] of sets) {
        const differences: Record<string, number> = {};
        for (const merge of ['none', 'nms', 'mean']) {
          const lines = (program: string): Line[] => runC(program, ['--no-timing', '--merge', merge, ...pgms]).stdout.trim().split('\n').map((l) => JSON.parse(l) as Line);
          const floats = lines(fastFloatProgram);
          const integers = lines(fastIntegerProgram);
          let differing = 0;
          floats.forEach((line, i) => {
            // Twins: the same support, the box within the integer build's 1/256-pixel rounding of
            // a mean (exact for nms and none), the score within 1e-6 (votes are kept in 2^-24 units;
            // measured at most 2.0e-7 apart). Anything else is a difference.
            const others = integers[i]!.detections;
            const twins = (a: Line['detections'][number], b: Line['detections'][number]): boolean =>
              a.support === b.support && Math.abs(a.score - b.score) < 1e-6 && a.box.every((v, k) => Math.abs(v - b.box[k]!) <= 1 / 512);
            differing += line.detections.filter((d) => !others.some((o) => twins(d, o))).length;
            differing += others.filter((o) => !line.detections.some((d) => twins(d, o))).length;
            // The integer build skips windows above 66,051 pixels; it never scans more.
            expect(integers[i]!.windowsScanned).toBeLessThanOrEqual(line.windowsScanned);
          });
          differences[merge] = differing;
        }
        // Measured (gcc 12.2, demo cascade), detections without a twin, both sides counted:
        // panels none 5 of 37,732 raw hits (one window accepted only by the integer build, two
        // whose split vote flipped at a near-tie in some stage, which changes their summed score
        // by a vote), nms 2 of 325, mean 2 of 190 (one detection with one more hit); photos 0 of
        // 13,707, 0 of 1,228, 0 of 959. Twins' scores are at most 2.0e-7 apart. Bound: at most 6.
        for (const merge of ['none', 'nms', 'mean']) expect(differences[merge], `${name} ${merge}`).toBeLessThanOrEqual(6);
      }
    });
  });

  describe('malformed input to the example program: a message, exit status 1, no sanitizer report', () => {
    const cases: Array<[string, Buffer, RegExp]> = [
      ['truncated pixels', Buffer.concat([Buffer.from('P5\n40 30\n255\n'), Buffer.alloc(100, 7)]), /truncated/],
      ['wrong header (ASCII P2)', Buffer.from('P2\n2 2\n255\n1 2 3 4\n'), /P5/],
      ['zero width', Buffer.from('P5\n0 30\n255\n'), /zero width or height/],
      ['huge size', Buffer.from('P5\n100000 100000\n255\n'), /above this detector's limit/],
      ['header without numbers', Buffer.from('P5\nwide tall\n255\n'), /malformed/],
      ['16-bit maxval', Buffer.concat([Buffer.from('P5\n2 2\n65535\n'), Buffer.alloc(8)]), /maxval 255/],
      ['empty file', Buffer.alloc(0), /P5/],
    ];
    for (const [name, bytes, message] of cases) {
      it(name, () => {
        const path = join(dir, `${name.replace(/\W+/g, '-')}.pgm`);
        writeFileSync(path, bytes);
        for (const program of [floatProgram, integerProgram]) {
          const result = runC(program, [path]);
          expect(result.status).toBe(1);
          expect(result.stdout).toBe('');
          expect(result.stderr).toMatch(message);
          expect(result.stderr).not.toMatch(/Sanitizer|runtime error/);
        }
      });
    }
    it('a missing file', () => {
      const result = runC(floatProgram, [join(dir, 'no-such.pgm')]);
      expect(result.status).toBe(1);
      expect(result.stderr).toMatch(/cannot be opened/);
    });
  });
});

describe.skipIf(!haveCompiler)('C99 export of an extended cascade (tilted and centre-surround features)', () => {
  it('float build prints the same JSON lines as rectboost detect; the integer build runs clean under the sanitizers', async () => {
    const extendedDir = mkdtempSync(join(tmpdir(), 'rectboost-c-extended-'));
    const model = randomCascadeModel('c-extended', [3, 3], { width: 12, height: 10 }, 'extended');
    expect(model.stages.flatMap((s) => s.weakClassifiers).some((weak) => weakClassifierSplits(weak)[0]!.feature.kind.startsWith('tilted-'))).toBe(true);
    const modelPath = join(extendedDir, 'extended.json');
    writeFileSync(modelPath, serializeCascadeModel(model));
    const footprint = exportC(modelPath, extendedDir);
    expect(footprint).not.toBe('');
    const float = compileC(extendedDir, 'detect-float', 'float', C_SANITIZER_FLAGS);
    const integer = compileC(extendedDir, 'detect-integer', 'integer', C_SANITIZER_FLAGS);
    const image = randomGrayImage(83, 61, 'c-extended-image');
    const png = join(extendedDir, 'noise.png');
    const pgm = join(extendedDir, 'noise.pgm');
    writeFileSync(png, await encodeGrayPng(image));
    writePgm(pgm, image);
    for (const options of [['--merge', 'none', '--scale-step', '1.2'], ['--merge', 'none', '--scale-step', '1.1', '--shift', '1.5']]) {
      const out = join(extendedDir, 'cli.jsonl');
      const cli = runCli(['detect', modelPath, png, '--no-timing', '--quiet', '--workers', '0', '--out', out, ...options]);
      expect(cli.stderr).toBe('');
      const expected = readFileSync(out, 'utf8').replace(JSON.stringify(png), JSON.stringify(pgm));
      expect((JSON.parse(expected) as Line).detections.length).toBeGreaterThan(5);
      const c = runC(float, ['--no-timing', ...options, pgm]);
      expect(c.stderr).toBe('');
      expect(c.status).toBe(0);
      expect(c.stdout).toBe(expected);
      const fixed = runC(integer, ['--no-timing', ...options, pgm]);
      expect(fixed.stderr).toBe('');
      expect(fixed.status).toBe(0);
      expect((JSON.parse(fixed.stdout) as Line).windowsScanned).toBe((JSON.parse(expected) as Line).windowsScanned);
    }
  });
});
