#!/usr/bin/env node
// Makes the README's picture of the HTML report: runs `rectboost demo` into a temporary folder
// (or takes a report page you name), opens the page in Debian's headless chromium through
// playwright-core, and writes a full-page screenshot scaled to 1000 pixels wide.
// Usage: node scripts/report-screenshot.js [REPORT.html] [--out docs/report-screenshot.png]
// Needs `npm run build` first and `apt-get install -y chromium`.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { chromium } from 'playwright-core';
import sharp from 'sharp';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const args = process.argv.slice(2);
const outAt = args.indexOf('--out');
const out = outAt >= 0 ? args[outAt + 1] : join(ROOT, 'docs', 'report-screenshot.png');
const named = args.filter((a, i) => a !== '--out' && i !== outAt + 1)[0];

const scratch = mkdtempSync(join(tmpdir(), 'rectboost-shot-'));
let page = named;
if (page === undefined) {
  // Run where the page will show the paths a user of `npm run demo` sees (demo-output/…).
  const demo = spawnSync(process.execPath, [join(ROOT, 'bin/rectboost.js'), 'demo', '--out', 'demo-output', '--quiet'], { stdio: 'inherit', cwd: scratch });
  if (demo.status !== 0) throw new Error(`rectboost demo failed with status ${demo.status}`);
  page = join(scratch, 'demo-output', 'report.html');
}
const context = await chromium.launchPersistentContext(join(scratch, 'profile'), {
  executablePath: '/usr/bin/chromium',
  headless: true,
  viewport: { width: 1400, height: 1000 },
  args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
});
try {
  const tab = await context.newPage();
  await tab.goto(pathToFileURL(page).href, { waitUntil: 'load' });
  const shot = await tab.screenshot({ fullPage: true });
  await sharp(shot).resize({ width: 1000 }).png({ compressionLevel: 9, palette: true, quality: 90 }).toFile(out);
  console.log(`Wrote ${out} from ${page} (chromium ${context.browser()?.version() ?? 'version unknown'}, playwright-core, sharp ${sharp.versions.sharp}).`);
} finally {
  await context.close();
  rmSync(scratch, { recursive: true, force: true });
}
