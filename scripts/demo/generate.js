// The rivet-inspection demo data set (DESIGN.md §7): positive patches, bare-panel
// backgrounds and annotated test scenes, all drawn from seeded random streams.
import { mkdir, readdir, rm, writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import sharp from 'sharp';
import { addSensorNoise, createCanvas, gaussianBlur, toBytes } from './canvas.js';
import { drawScrewHead, drawStencil, randomStencilText } from './distractors.js';
import { paintPanel, paintScratch, paintSeam, paintStain } from './panel.js';
import { makeRandom } from './random.js';
import { drawRivet, jitterRivetLook, randomRivetLook } from './rivet.js';

/** Side of a positive patch, the detector window, in pixels. */
export const PATCH_SIDE = 24;
/** Rivet head diameter as a share of the patch side: uniform in this range. */
export const HEAD_SHARE = [0.55, 0.8];
/** Largest shift of the rivet centre from the patch centre, in pixels (per axis). */
export const PATCH_OFFSET = 1.5;
/** Defaults of the committed data set. */
export const DEFAULTS = { seed: 1, positives: 1200, backgrounds: 20, scenes: 8, backgroundWidth: 320, backgroundHeight: 240, sceneWidth: 480, sceneHeight: 360 };

/**
 * One 24×24 positive: brushed panel (sometimes stained or scratched), a rivet of head
 * diameter 55–80 % of the side within ±1.5 px of the centre, random light, blur
 * (σ 0–1.1 px) and sensor noise (σ 1.5–6 gray levels).
 * Returns { width, height, data: Uint8Array, drawn: string[] }.
 */
export function generatePositive(seed, index) {
  const random = makeRandom(`${seed}/positive/${index}`);
  const canvas = createCanvas(PATCH_SIDE, PATCH_SIDE);
  paintPanel(canvas, random);
  if (random.chance(0.3)) paintStain(canvas, random, random.uniform(0, PATCH_SIDE), random.uniform(0, PATCH_SIDE), random.uniform(6, 14));
  if (random.chance(0.3)) paintScratch(canvas, random, random.uniform(0, PATCH_SIDE), random.uniform(0, PATCH_SIDE), random.uniform(10, 30));
  const radius = (random.uniform(HEAD_SHARE[0], HEAD_SHARE[1]) * PATCH_SIDE) / 2;
  const centerX = PATCH_SIDE / 2 + random.uniform(-PATCH_OFFSET, PATCH_OFFSET);
  const centerY = PATCH_SIDE / 2 + random.uniform(-PATCH_OFFSET, PATCH_OFFSET);
  drawRivet(canvas, centerX, centerY, radius, randomRivetLook(random));
  gaussianBlur(canvas, random.uniform(0, 1.1));
  addSensorNoise(canvas, random, random.uniform(1.5, 6));
  return { width: PATCH_SIDE, height: PATCH_SIDE, data: toBytes(canvas), drawn: canvas.drawn };
}

/**
 * One bare panel with no rivet: stains, seams, scratches, slotted screw heads and
 * stencilled marks, then blur and noise. Returns { width, height, data, drawn }.
 */
export function generateBackground(seed, index, width = DEFAULTS.backgroundWidth, height = DEFAULTS.backgroundHeight) {
  const random = makeRandom(`${seed}/background/${index}`);
  const canvas = createCanvas(width, height);
  paintPanel(canvas, random);
  for (let i = random.integer(0, 3); i > 0; i--) paintStain(canvas, random, random.uniform(0, width), random.uniform(0, height), random.uniform(10, 45));
  for (let i = random.integer(0, 2); i > 0; i--) {
    const axis = random.chance(0.5) ? 'x' : 'y';
    paintSeam(canvas, random, axis, random.uniform(10, (axis === 'x' ? height : width) - 10));
  }
  for (let i = random.integer(2, 8); i > 0; i--) paintScratch(canvas, random, random.uniform(0, width), random.uniform(0, height), random.uniform(20, 150));
  const taken = [];
  const lightAzimuth = random.uniform(0, 2 * Math.PI);
  for (let i = random.integer(2, 6); i > 0; i--) {
    const radius = random.uniform(4, 20);
    const spot = findFreeSpot(random, width, height, 2 * radius + 4, 2 * radius + 4, taken);
    if (spot !== null) drawScrewHead(canvas, random, spot[0] + radius + 2, spot[1] + radius + 2, radius, lightAzimuth);
  }
  for (let i = random.integer(1, 3); i > 0; i--) placeStencil(canvas, random, width, height, taken);
  gaussianBlur(canvas, random.uniform(0.4, 1.0));
  addSensorNoise(canvas, random, random.uniform(2, 5));
  return { width, height, data: toBytes(canvas), drawn: canvas.drawn };
}

/**
 * One test scene: a panel with two to four groups (rows, columns, grids) of rivets, each
 * group at one window side between 24 and 72 px, plus the background's distractors.
 * `boxes` are the rivets' window-equivalent squares [x, y, side, side]: the rivet sits at
 * the square's centre with head diameter 62–73 % of the side, the framing of the positives.
 * Returns { width, height, data, drawn, boxes }.
 */
export function generateScene(seed, index, width = DEFAULTS.sceneWidth, height = DEFAULTS.sceneHeight) {
  const random = makeRandom(`${seed}/scene/${index}`);
  const canvas = createCanvas(width, height);
  const look = randomRivetLook(random);
  const groups = [];
  const boxes = [];
  const wanted = random.integer(2, 4);
  for (let attempt = 0; attempt < 60 && groups.length < wanted; attempt++) {
    const group = layoutGroup(random, width, height);
    // Keep 6 px of panel between groups so no two truth squares touch.
    if (group !== null && group.boxes.every((box) => boxes.every((other) => !overlaps(box, other, 6)))) {
      groups.push(group);
      boxes.push(...group.boxes);
    }
  }
  paintPanel(canvas, random);
  for (let i = random.integer(0, 2); i > 0; i--) paintStain(canvas, random, random.uniform(0, width), random.uniform(0, height), random.uniform(10, 45));
  for (const group of groups) {
    // A row of rivets usually holds a lap joint: put the sheet edge just below the row.
    if (group.kind === 'row' && random.chance(0.6)) paintSeam(canvas, random, 'x', group.boxes[0][1] + group.side * 1.05);
  }
  for (let i = random.integer(2, 6); i > 0; i--) paintScratch(canvas, random, random.uniform(0, width), random.uniform(0, height), random.uniform(20, 150));
  for (const group of groups) {
    for (const [x, y, side] of group.boxes) {
      const radius = (random.uniform(0.62, 0.73) * side) / 2;
      const shift = 0.03 * side;
      drawRivet(canvas, x + side / 2 + random.uniform(-shift, shift), y + side / 2 + random.uniform(-shift, shift), radius, jitterRivetLook(look, random));
    }
  }
  const taken = boxes.map(([x, y, w, h]) => [x - 6, y - 6, w + 12, h + 12]);
  for (let i = random.integer(2, 5); i > 0; i--) {
    const radius = random.uniform(6, 22);
    const spot = findFreeSpot(random, width, height, 2 * radius + 4, 2 * radius + 4, taken);
    if (spot !== null) drawScrewHead(canvas, random, spot[0] + radius + 2, spot[1] + radius + 2, radius, look.light.azimuth);
  }
  for (let i = random.integer(1, 2); i > 0; i--) placeStencil(canvas, random, width, height, taken);
  gaussianBlur(canvas, random.uniform(0.5, 1.0));
  addSensorNoise(canvas, random, random.uniform(2, 5));
  return { width, height, data: toBytes(canvas), drawn: canvas.drawn, boxes };
}

/** A row, column or grid of equal rivet squares at a random place inside the canvas, or null when it does not fit. */
function layoutGroup(random, width, height) {
  // Log-uniform side from 24 to 72 px, so each octave of scale is equally common.
  const side = Math.round(PATCH_SIDE * 3 ** random.uniform(0, 1));
  const kind = random.pick(['row', 'row', 'column', 'grid']);
  const pitch = Math.round(side * random.uniform(1.2, 1.7));
  const columns = kind === 'column' ? 1 : kind === 'grid' ? random.integer(2, 4) : random.integer(3, 8);
  const rows = kind === 'row' ? 1 : kind === 'grid' ? random.integer(2, 3) : random.integer(3, 5);
  const spanX = (columns - 1) * pitch + side;
  const spanY = (rows - 1) * pitch + side;
  const left = random.integer(2, Math.max(2, width - spanX - 2));
  const top = random.integer(2, Math.max(2, height - spanY - 2));
  const boxes = [];
  for (let r = 0; r < rows; r++) {
    for (let c = 0; c < columns; c++) {
      const box = [left + c * pitch, top + r * pitch, side, side];
      if (box[0] + side <= width - 2 && box[1] + side <= height - 2) boxes.push(box);
    }
  }
  return boxes.length === rows * columns ? { kind, side, boxes } : null;
}

/** True when two [x, y, w, h] boxes come closer than `margin` pixels. */
function overlaps(a, b, margin) {
  return a[0] < b[0] + b[2] + margin && b[0] < a[0] + a[2] + margin && a[1] < b[1] + b[3] + margin && b[1] < a[1] + a[3] + margin;
}

/** Top-left corner of a free w×h spot inside the canvas, away from `taken` boxes (which it extends), or null. */
function findFreeSpot(random, width, height, w, h, taken) {
  for (let attempt = 0; attempt < 40; attempt++) {
    if (w > width - 4 || h > height - 4) return null;
    const box = [random.uniform(2, width - w - 2), random.uniform(2, height - h - 2), w, h];
    if (taken.every((other) => !overlaps(box, other, 3))) {
      taken.push(box);
      return [box[0], box[1]];
    }
  }
  return null;
}

function placeStencil(canvas, random, width, height, taken) {
  const text = randomStencilText(random, random.integer(2, 5));
  const charHeight = random.uniform(8, 24);
  // Tilt of up to ~5° moves the far end by text length × 0.08; pad for it.
  const w = text.length * charHeight + 4;
  const h = charHeight * 1.4 + 4;
  const spot = findFreeSpot(random, width, height, w, h, taken);
  if (spot !== null) drawStencil(canvas, random, text, spot[0] + 2, spot[1] + 2 + charHeight * 0.2, charHeight);
}

async function writeGrayPng(path, image) {
  const png = await sharp(Buffer.from(image.data.buffer, image.data.byteOffset, image.data.length), {
    raw: { width: image.width, height: image.height, channels: 1 },
  })
    .png({ compressionLevel: 9, adaptiveFiltering: true })
    .toBuffer();
  await writeFile(path, png);
  return png.length;
}

/** Zero-padded item number, e.g. name('rivet-', 7, 4) = 'rivet-0007.png'. */
function name(prefix, number, digits) {
  return `${prefix}${String(number).padStart(digits, '0')}.png`;
}

/** Removes files a previous run wrote under these names, so a smaller run leaves no strays. */
async function clearOldOutput(folder, pattern) {
  let entries = [];
  try {
    entries = await readdir(folder);
  } catch {
    return;
  }
  for (const entry of entries) if (pattern.test(entry)) await rm(join(folder, entry));
}

/**
 * Writes the demo data set under `out`: positives/rivet-NNNN.png, backgrounds/panel-NN.png,
 * scenes/pNN.png, scenes/truth.jsonl and README.md. Deterministic for a given seed and counts;
 * item i is the same picture whatever the counts.
 * Returns { files: [relative paths], bytes } with the PNG and text bytes written.
 */
export async function generateDemo(options = {}) {
  const settings = { ...DEFAULTS, out: 'demo-patches', ...options };
  const { out, seed } = settings;
  const folders = { positives: join(out, 'positives'), backgrounds: join(out, 'backgrounds'), scenes: join(out, 'scenes') };
  for (const folder of Object.values(folders)) await mkdir(folder, { recursive: true });
  await clearOldOutput(folders.positives, /^rivet-\d+\.png$/);
  await clearOldOutput(folders.backgrounds, /^panel-\d+\.png$/);
  await clearOldOutput(folders.scenes, /^(p\d+\.png|truth\.jsonl)$/);
  const files = [];
  let bytes = 0;
  for (let i = 1; i <= settings.positives; i++) {
    const file = join('positives', name('rivet-', i, 4));
    bytes += await writeGrayPng(join(out, file), generatePositive(seed, i));
    files.push(file);
  }
  for (let i = 1; i <= settings.backgrounds; i++) {
    const file = join('backgrounds', name('panel-', i, 2));
    bytes += await writeGrayPng(join(out, file), generateBackground(seed, i, settings.backgroundWidth, settings.backgroundHeight));
    files.push(file);
  }
  const truthLines = [];
  let rivets = 0;
  for (let i = 1; i <= settings.scenes; i++) {
    const scene = generateScene(seed, i, settings.sceneWidth, settings.sceneHeight);
    const imageName = name('p', i, 2);
    bytes += await writeGrayPng(join(folders.scenes, imageName), scene);
    files.push(join('scenes', imageName));
    truthLines.push(JSON.stringify({ image: imageName, boxes: scene.boxes }));
    rivets += scene.boxes.length;
  }
  const truth = truthLines.join('\n') + (truthLines.length > 0 ? '\n' : '');
  await writeFile(join(folders.scenes, 'truth.jsonl'), truth);
  files.push(join('scenes', 'truth.jsonl'));
  const readme = describeDataSet(settings, rivets);
  await writeFile(join(out, 'README.md'), readme);
  files.push('README.md');
  bytes += Buffer.byteLength(truth) + Buffer.byteLength(readme);
  return { files, bytes, rivets };
}

function describeDataSet(settings, rivets) {
  return `# Demo data: rivet inspection on sheet-metal panels

An invented scenario for trying rectboost end to end. Every picture here was drawn by
\`scripts/generate-demo.js\` (seed ${settings.seed}); nothing is photographed. Regenerate with

    node scripts/generate-demo.js --out demo-patches --seed ${settings.seed} --positives ${settings.positives} --backgrounds ${settings.backgrounds} --scenes ${settings.scenes}

## Contents

- \`positives/rivet-NNNN.png\` — ${settings.positives} gray patches of ${PATCH_SIDE}×${PATCH_SIDE} pixels, one dome
  rivet head each: head diameter ${HEAD_SHARE[0] * 100}–${HEAD_SHARE[1] * 100} % of the side, centre within
  ±${PATCH_OFFSET} px of the patch centre, light from any direction 30–65° above the panel
  (Lambert shading with a specular highlight, a dark crevice ring and a cast shadow), varied
  contrast, Gaussian blur σ 0–1.1 px and sensor noise σ 1.5–6 gray levels, on brushed metal
  that is sometimes stained or scratched.
- \`backgrounds/panel-NN.png\` — ${settings.backgrounds} bare panels of ${settings.backgroundWidth}×${settings.backgroundHeight} pixels with
  **no rivets**: brushed-metal grain and light gradients, stains, sheet seams, scratches, and two
  kinds of hard distractors — flat slotted (or cross-slotted) screw heads and stencilled part
  codes drawn with simple strokes. Use them as the source of negative windows.
- \`scenes/pNN.png\` — ${settings.scenes} panels of ${settings.sceneWidth}×${settings.sceneHeight} pixels with rows, columns and grids of
  rivets (${rivets} in all) at window sides from 24 to 72 px, among the same distractors.
- \`scenes/truth.jsonl\` — the ground truth, one JSON line per scene:
  \`{"image": "p01.png", "boxes": [[x, y, width, height], ...]}\`, image paths relative to
  this file. Each box is the square a ${PATCH_SIDE}×${PATCH_SIDE} positive would frame, scaled: the rivet sits at its
  centre with head diameter 62–73 % of the side.

Each item has its own random stream (seed/kind/number), so item *n* is the same picture
whatever the counts asked for.
`;
}
