// Exports a cascade as C99 (rectboost export --c) and compiles the example
// program with the system C compiler; shared by the C tests and the bench.
import { spawnSync } from 'node:child_process';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';

const BIN = fileURLToPath(new URL('../../bin/rectboost.js', import.meta.url));

/** Flags every build gets: strict C99, all warnings as errors, no fused multiply-add. */
export const C_STRICT_FLAGS = ['-std=c99', '-Wall', '-Wextra', '-Werror', '-pedantic', '-ffp-contract=off'];
/** Flags of the test builds: address and undefined-behaviour sanitizers that stop at the first report. */
export const C_SANITIZER_FLAGS = ['-O1', '-g', '-fsanitize=address,undefined', '-fno-sanitize-recover=all', '-fno-omit-frame-pointer'];

/** The C compiler's version line, or undefined when `cc` is missing. */
export function compilerVersion() {
  const result = spawnSync('cc', ['--version'], { encoding: 'utf8' });
  return result.status === 0 ? result.stdout.split('\n')[0] : undefined;
}

/** Runs `rectboost export MODEL --c DIR`; returns its stderr (the footprint lines). */
export function exportC(model, dir) {
  mkdirSync(dir, { recursive: true });
  const result = spawnSync(process.execPath, [BIN, 'export', model, '--c', dir], { encoding: 'utf8' });
  if (result.status !== 0) throw new Error(`rectboost export --c failed: ${result.stderr}`);
  return result.stderr;
}

/**
 * Compiles DIR/detect_pgm.c with DIR/rectboost_detector.c into DIR/NAME.
 * build: 'float' or 'integer'; extraFlags e.g. C_SANITIZER_FLAGS or ['-O2'].
 * Returns the program's path.
 */
export function compileC(dir, name, build, extraFlags) {
  const output = join(dir, name);
  const args = [...C_STRICT_FLAGS, ...extraFlags, ...(build === 'integer' ? ['-DRBD_INTEGER'] : []), join(dir, 'detect_pgm.c'), join(dir, 'rectboost_detector.c'), '-lm', '-o', output];
  const result = spawnSync('cc', args, { encoding: 'utf8' });
  if (result.status !== 0) throw new Error(`cc ${args.join(' ')} failed:\n${result.stderr}`);
  return output;
}

/** Writes a gray image ({width, height, data}) as binary PGM (P5, maxval 255). */
export function writePgm(path, image) {
  writeFileSync(path, Buffer.concat([Buffer.from(`P5\n${image.width} ${image.height}\n255\n`, 'ascii'), Buffer.from(image.data.buffer, image.data.byteOffset, image.data.length)]));
}
