// Types for the demo generator (plain JavaScript in scripts/), so TypeScript tests can call it.

/** A drawn picture, 8-bit gray, row-major, with the kinds of things drawn on it in order. */
export interface DemoPicture {
  readonly width: number;
  readonly height: number;
  readonly data: Uint8Array;
  readonly drawn: string[];
}

export interface DemoScene extends DemoPicture {
  /** Truth squares [x, y, side, side] of the rivets, in pixels. */
  readonly boxes: Array<[number, number, number, number]>;
}

export interface DemoOptions {
  out?: string;
  seed?: number;
  positives?: number;
  backgrounds?: number;
  scenes?: number;
  backgroundWidth?: number;
  backgroundHeight?: number;
  sceneWidth?: number;
  sceneHeight?: number;
}

export const PATCH_SIDE: number;
export const HEAD_SHARE: [number, number];
export const PATCH_OFFSET: number;
export const DEFAULTS: Required<Omit<DemoOptions, 'out'>>;

export function generatePositive(seed: number, index: number): DemoPicture;
export function generateBackground(seed: number, index: number, width?: number, height?: number): DemoPicture;
export function generateScene(seed: number, index: number, width?: number, height?: number): DemoScene;
export function generateDemo(options?: DemoOptions): Promise<{ files: string[]; bytes: number; rivets: number }>;
