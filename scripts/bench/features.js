// Feature evaluation throughput on one core: all 162,336 basic features of a
// 24×24 window on seeded random windows, through the compiled corner lists.
import seedrandom from 'seedrandom';
import { compileFeatures, evaluateCompiledFeature } from '../../dist/features/compiled-features.js';
import { enumerateFeatures } from '../../dist/features/enumerate-features.js';
import { packWindowSamples } from '../../dist/features/window-samples.js';

export const title = 'Haar-like feature evaluation, one core';

export async function run() {
  const random = seedrandom('bench-features');
  const windows = Array.from({ length: 200 }, () => {
    const data = new Uint8Array(24 * 24);
    for (let i = 0; i < data.length; i++) data[i] = Math.floor(random() * 256);
    return { width: 24, height: 24, data };
  });
  let start = performance.now();
  const features = enumerateFeatures(24, 24);
  const compiled = compileFeatures(features, 25);
  const samples = packWindowSamples(windows, 24, 24);
  console.log(`enumerate + compile ${features.length} features: ${(performance.now() - start).toFixed(1)} ms`);
  let sink = 0;
  start = performance.now();
  for (let s = 0; s < samples.count; s++) {
    const base = s * samples.tableSize;
    for (let f = 0; f < compiled.count; f++) sink += evaluateCompiledFeature(compiled, f, samples.tables, base);
  }
  const seconds = (performance.now() - start) / 1000;
  const evaluations = samples.count * compiled.count;
  console.log(`${evaluations.toLocaleString('en-US')} feature values in ${seconds.toFixed(2)} s: ${(evaluations / seconds / 1e6).toFixed(1)} million features/s on one core (checksum ${sink.toExponential(3)})`);
}
