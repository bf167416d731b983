#!/usr/bin/env node
// Writes the demo data set (rivet inspection on sheet-metal panels) that `rectboost demo`
// trains and evaluates on. Usage:
//   node scripts/generate-demo.js [--out DIR] [--seed N] [--positives N] [--backgrounds N] [--scenes N]
import { fileURLToPath } from 'node:url';
import { DEFAULTS, generateDemo } from './demo/generate.js';

const USAGE = 'Usage: node scripts/generate-demo.js [--out DIR] [--seed N] [--positives N] [--backgrounds N] [--scenes N]';
const COUNT_LIMIT = 100_000;

/** Parses argv into generateDemo options; throws an Error with a one-sentence message on bad input. */
export function parseArguments(argv) {
  const options = { out: fileURLToPath(new URL('../demo-patches', import.meta.url)), seed: DEFAULTS.seed };
  for (let i = 0; i < argv.length; i++) {
    const flag = argv[i];
    if (flag === '--help' || flag === '-h') return null;
    const value = argv[i + 1];
    if (!['--out', '--seed', '--positives', '--backgrounds', '--scenes'].includes(flag)) {
      throw new Error(`Unknown option ${JSON.stringify(flag)}; expected one of --out, --seed, --positives, --backgrounds, --scenes.`);
    }
    if (value === undefined) throw new Error(`Option ${flag} needs a value.`);
    i++;
    if (flag === '--out') {
      options.out = value;
      continue;
    }
    const number = Number(value);
    const low = flag === '--seed' ? 0 : flag === '--positives' ? 1 : 0;
    if (!Number.isInteger(number) || number < low || number > (flag === '--seed' ? 2 ** 31 : COUNT_LIMIT)) {
      throw new Error(`Option ${flag} must be an integer from ${low} to ${flag === '--seed' ? 2 ** 31 : COUNT_LIMIT}; received ${JSON.stringify(value)}.`);
    }
    options[flag.slice(2)] = number;
  }
  return options;
}

async function main() {
  let options;
  try {
    options = parseArguments(process.argv.slice(2));
  } catch (error) {
    process.stderr.write(`${error.message}\n${USAGE}\n`);
    process.exit(2);
  }
  if (options === null) {
    process.stdout.write(`${USAGE}\nDefaults: --out demo-patches --seed ${DEFAULTS.seed} --positives ${DEFAULTS.positives} --backgrounds ${DEFAULTS.backgrounds} --scenes ${DEFAULTS.scenes}\n`);
    return;
  }
  const started = performance.now();
  const result = await generateDemo(options);
  const seconds = (performance.now() - started) / 1000;
  process.stdout.write(`Wrote ${result.files.length} files (${(result.bytes / 1e6).toFixed(2)} MB, ${result.rivets} rivets in the scenes) to ${options.out} in ${seconds.toFixed(1)} s.\n`);
}

if (process.argv[1] !== undefined && fileURLToPath(import.meta.url) === process.argv[1]) {
  main().catch((error) => {
    process.stderr.write(`Demo generation failed: ${error.message}\n`);
    process.exit(1);
  });
}
