import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { extname, join, normalize } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { decodeGrayImageFile } from '../../src/io/decode-image.js';
import { launchChromium, shouldRunBrowserTests } from '../helpers/chromium.js';
import { runCli } from '../helpers/run-cli.js';

// The runtime (dist/runtime, built by npm test) in Debian's Chromium: a static page runs the
// demo cascade on demo panel p03 and must find what `rectboost detect` finds.
const ROOT = fileURLToPath(new URL('../../', import.meta.url));
const MODEL = fileURLToPath(new URL('../fixtures/demo-cascade.json', import.meta.url));
const PANEL = fileURLToPath(new URL('../../demo-patches/scenes/p03.png', import.meta.url));
const haveChromium = shouldRunBrowserTests();

const TYPES: Record<string, string> = { '.js': 'text/javascript', '.html': 'text/html', '.json': 'application/json', '.map': 'application/json' };

let server: Server;
let origin = '';
let work = '';
let panel = { width: 0, height: 0 };

describe.skipIf(!haveChromium)('rectboost/runtime in Chromium', () => {
  beforeAll(async () => {
    work = mkdtempSync(join(tmpdir(), 'rectboost-browser-'));
    const cascadePath = join(work, 'cascade.json');
    const exported = runCli(['export', MODEL, '--out', cascadePath]);
    expect(exported.status).toBe(0);
    const image = await decodeGrayImageFile(PANEL);
    panel = { width: image.width, height: image.height };
    const files: Record<string, Buffer> = { '/cascade.json': readFileSync(cascadePath), '/panel.gray': Buffer.from(image.data) };
    // Serves the page, dist/ and the two generated files; nothing else.
    server = createServer((request, response) => {
      const path = normalize(decodeURIComponent(new URL(request.url ?? '/', 'http://x').pathname));
      const body = files[path] ?? (path === '/' ? readFileSync(join(ROOT, 'test/runtime/browser/index.html')) : path.startsWith('/dist/') && existsSync(join(ROOT, path)) ? readFileSync(join(ROOT, path)) : undefined);
      if (body === undefined) {
        response.writeHead(404).end();
        return;
      }
      response.writeHead(200, { 'content-type': path === '/' ? TYPES['.html']! : TYPES[extname(path)] ?? 'application/octet-stream' }).end(body);
    });
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
    origin = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  });

  afterAll(async () => {
    await new Promise<void>((resolve) => (server ? server.close(() => resolve()) : resolve()));
    if (work) rmSync(work, { recursive: true, force: true });
  });

  it('finds the same detections as rectboost detect, with the kernel, with the plain-JS scan and from an ImageData', async () => {
    const options = ['--merge', 'mean', '--overlap', '0.5', '--min-support', '3'];
    const cli = runCli(['detect', MODEL, PANEL, '--no-timing', '--quiet', '--workers', '0', ...options]);
    expect(cli.status).toBe(0);
    const expected = JSON.parse(cli.stdout) as { detections: unknown[]; windowsScanned: number };
    const browser = await launchChromium();
    try {
      const merge = JSON.stringify({ method: 'mean', overlap: 0.5, minSupport: 3 });
      const { page, errors } = await browser.openUrl(`${origin}/?width=${panel.width}&height=${panel.height}&merge=${encodeURIComponent(merge)}`);
      await page.waitForFunction(() => (globalThis as { rectboostResult?: unknown }).rectboostResult !== undefined, undefined, { timeout: 60_000 });
      const result = (await page.evaluate(() => (globalThis as { rectboostResult?: unknown }).rectboostResult)) as Record<string, { engine: string; detections: unknown[]; windowsScanned: number }> & { error?: string; kernelAvailable?: boolean };
      expect(result.error).toBeUndefined();
      expect(errors).toEqual([]);
      expect(result.kernelAvailable).toBe(true);
      expect(expected.detections.length).toBeGreaterThan(5);
      for (const [name, engine] of [['auto', 'kernel'], ['plain', 'plain'], ['imageData', 'kernel']] as const) {
        expect(result[name]!.engine).toBe(engine);
        // Compared as JSON text: the same numbers to the last bit, in the same order.
        expect(JSON.stringify(result[name]!.detections), name).toBe(JSON.stringify(expected.detections));
        expect(result[name]!.windowsScanned).toBe(expected.windowsScanned);
      }
    } finally {
      await browser.close();
    }
  });
});
