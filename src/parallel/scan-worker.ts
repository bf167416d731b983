// Worker side of the scan pool: holds one DetectorCascade (from workerData) and
// scans the images it is sent. Loaded from dist/ as plain JS (Node 20).
import { parentPort, workerData } from 'node:worker_threads';
import { cascadeUsesTiltedFeatures, type DetectorCascade } from '../detect/detector-cascade.js';
import { scanImage, type ScanOptions } from '../detect/scan-image.js';
import { computeIntegralImage } from '../image/integral-image.js';

interface ScanRequest {
  readonly id: number;
  readonly width: number;
  readonly height: number;
  readonly pixels: Uint8Array;
  readonly options: ScanOptions;
}

const cascade = (workerData as { cascade: DetectorCascade }).cascade;
const rotated = cascadeUsesTiltedFeatures(cascade);

parentPort!.on('message', (request: ScanRequest) => {
  try {
    const start = performance.now();
    const integral = computeIntegralImage({ width: request.width, height: request.height, data: request.pixels }, { rotated });
    const { hits, statistics } = scanImage(cascade, integral, request.options);
    const milliseconds = performance.now() - start;
    const transfer = [hits.x.buffer, hits.y.buffer, hits.width.buffer, hits.height.buffer, hits.score.buffer] as ArrayBuffer[];
    parentPort!.postMessage({ id: request.id, hits, statistics, milliseconds }, transfer);
  } catch (error) {
    parentPort!.postMessage({ id: request.id, error: error instanceof Error ? { message: error.message, code: (error as { code?: string }).code } : { message: String(error) } });
  }
});
